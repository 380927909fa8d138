'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useForm } from 'react-hook-form';
import { apiFetch, ApiError } from '@/components/session/api';
import { Button } from '@/components/ui/button';
import { FormField, inputClass } from '@/components/ui/form-field';
import { passwordProblem, PASSWORD_RULES } from '@/lib/auth/password';
import { acceptInvitationInput, type AcceptInvitationInput } from '@/lib/fleet/invitations';

/** The shared schema plus the rule that needs the invited e-mail, which the server checks again. */
function schemaFor(email: string) {
  return acceptInvitationInput.superRefine((v, ctx) => {
    const problem = passwordProblem(v.password, { email, name: v.name });
    if (problem) ctx.addIssue({ code: 'custom', path: ['password'], message: problem });
  });
}

/** The invited person's name and password; on success they go to sign-in with their new password. */
export function AcceptInvitationForm({ token, email }: { token: string; email: string }) {
  const router = useRouter();
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors },
  } = useForm<AcceptInvitationInput>({ resolver: zodResolver(schemaFor(email)), defaultValues: { token, name: '', password: '' } });
  const accept = useMutation({
    mutationFn: (values: AcceptInvitationInput) => apiFetch('/api/invitations/accept', { method: 'POST', body: values }),
    onSuccess: () => router.push(`/sign-in?callbackUrl=${encodeURIComponent('/')}`),
    onError: (e) => {
      if (e instanceof ApiError && (e.field === 'name' || e.field === 'password')) setError(e.field, { message: e.message.replace(/^\w+: /, '') });
    },
  });
  const formError = accept.error && !(accept.error instanceof ApiError && (accept.error.field === 'name' || accept.error.field === 'password')) ? accept.error.message.replace(/^token: /, '') : null;

  return (
    <form onSubmit={handleSubmit((v) => accept.mutate(v))} noValidate className="mt-6 grid gap-4">
      <input type="hidden" {...register('token')} />
      <FormField label="E-mail">
        <input value={email} readOnly autoComplete="username" className={`${inputClass} bg-paper`} />
      </FormField>
      <FormField label="Your name" error={errors.name?.message}>
        <input {...register('name')} autoComplete="name" className={inputClass} aria-invalid={Boolean(errors.name)} />
      </FormField>
      <FormField label="New password" error={errors.password?.message}>
        <input {...register('password')} type="password" autoComplete="new-password" className={inputClass} aria-invalid={Boolean(errors.password)} aria-describedby="password-rules" />
      </FormField>
      <ul id="password-rules" className="-mt-2 grid list-disc gap-1 pl-5 text-sm text-ink-soft">
        {PASSWORD_RULES.map((rule) => (
          <li key={rule}>{rule}</li>
        ))}
      </ul>
      {formError && (
        <p role="alert" className="rounded-lg bg-fail/10 p-3 font-semibold text-fail">
          {formError}
        </p>
      )}
      <Button type="submit" disabled={accept.isPending || accept.isSuccess}>
        {accept.isPending ? 'Creating your account…' : 'Join and go to sign-in'}
      </Button>
    </form>
  );
}
