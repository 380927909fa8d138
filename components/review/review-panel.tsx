'use client';

import { useRef, useState } from 'react';
import * as z from 'zod/mini';
import { reviewApprove, reviewComment, reviewReturn } from '@/lib/session/commands';
import type { SessionState } from '@/lib/session/fold';
import { apiFetch, ApiError } from '@/components/session/api';
import { clock } from '@/components/coach/format';
import { SignatureField, type SignaturePadHandle } from './signature-pad';
import { SignatureSvg } from './signature-svg';
import { StatusChip } from './record-status';

type Props = {
  sessionId: string;
  /** The record as it stands now (the whole log folded), not the moment the replay shows. */
  record: SessionState;
  /** Reviewers and admins reading the session may comment, return and approve. */
  canReview: boolean;
  /** The playhead: a comment is pinned here. */
  seq: number;
  /** "seq N · hh:mm:ss" for a seq, as the timeline reads it out. */
  momentOf: (seq: number) => string;
  /** Who made the event at a seq, in words ("You", "A reviewer"). */
  whoMade: (seq: number) => string;
  onSeek: (seq: number) => void;
  /** Called after the server stored an act: the replay fetches the new events. */
  onStored: () => Promise<void>;
};

/** A field's error from the client's check or the server's 400 (its `field` names the body path). */
type FieldError = { field: string; message: string };

function issueOf(error: z.core.$ZodError): FieldError {
  const issue = error.issues[0];
  return { field: issue?.path.map(String).join('.') ?? '', message: issue?.message ?? 'not valid' };
}

function errorOf(e: unknown): FieldError {
  if (e instanceof ApiError) return { field: e.field ?? '', message: e.field && e.message.startsWith(`${e.field}: `) ? e.message.slice(e.field.length + 2) : e.message };
  return { field: '', message: e instanceof TypeError ? 'No connection to the server; nothing was sent. Try again.' : 'Something went wrong; nothing was sent.' };
}

const under = (err: FieldError | null, ...fields: string[]) => (err && fields.some((f) => err.field === f || err.field.startsWith(`${f}.`)) ? err.message : null);
const formLevel = (err: FieldError | null, known: string[]) => (err && !known.some((f) => err.field === f || err.field.startsWith(`${f}.`)) ? err.message : null);

async function post(sessionId: string, body: Record<string, unknown>) {
  return apiFetch<{ seq: number; duplicate: boolean }>(`/api/sessions/${sessionId}/review`, { method: 'POST', body });
}

/** One id per act until the server stores it: a resend after a lost answer stores nothing twice. */
function useActId() {
  const id = useRef<string | null>(null);
  return {
    get: () => (id.current ??= crypto.randomUUID()),
    done: () => void (id.current = null),
  };
}

const REVIEWABLE = ['ended', 'in_review'];

/**
 * The record's review: its status, the comments pinned to moments (a click seeks there), returns and the rework taken
 * up, the approval with its signature; and, for reviewers and admins, the acts: pin a comment at the playhead, return
 * for rework with reasons, approve with a typed name and a drawn signature.
 */
export function ReviewPanel({ sessionId, record, canReview, seq, momentOf, whoMade, onSeek, onStored }: Props) {
  const { status, review } = record;
  const lastReturn = review.returns.at(-1);
  return (
    <section aria-labelledby="review-h" data-testid="review-panel" className="grid gap-3 rounded-2xl border-2 border-ink bg-card p-3">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h2 id="review-h" className="text-xl font-bold">
          Review
        </h2>
        <StatusChip status={status} />
      </div>
      <p className="text-sm" data-testid="record-status-words">
        {status === 'live' && 'The session is live: it can be reviewed once the technician finishes it.'}
        {status === 'ended' && `Ended at ${record.ended ? clock(record.ended.at) : '—'}; waiting for review.`}
        {status === 'in_review' && 'In review: comments are pinned; it waits to be approved or returned.'}
        {status === 'returned' && lastReturn && `Returned for rework at ${clock(lastReturn.at)}; the technician takes it up again from the field view.`}
        {status === 'approved' && review.approval && `Approved by ${review.approval.name} at ${new Date(review.approval.at).toLocaleString('en-GB')}.`}
      </p>

      {review.approval && (
        <figure className="grid gap-1 rounded-xl border-2 border-pass bg-pass/5 p-3" data-testid="approval">
          <SignatureSvg signature={review.approval.signature} label={`Signature of ${review.approval.name}`} className="max-h-32 text-ink" />
          <figcaption className="text-sm">
            <b>{review.approval.name}</b> · approved {new Date(review.approval.at).toLocaleString('en-GB')} · #{review.approval.seq}
          </figcaption>
        </figure>
      )}

      {review.returns.length > 0 && (
        <div className="grid gap-1">
          <h3 className="font-bold">Returns for rework</h3>
          <ol className="grid gap-1 text-sm">
            {review.returns.map((r) => {
              const resumed = review.resumes.find((x) => x.seq > r.seq);
              return (
                <li key={r.seq} data-testid="return" className="rounded-lg border-l-8 border-fail bg-paper px-3 py-2">
                  <p className="text-xs text-ink-soft">
                    {whoMade(r.seq)} · {clock(r.at)} · #{r.seq}
                    {resumed ? ` · taken up again at ${clock(resumed.at)}` : ''}
                  </p>
                  <ul className="list-disc pl-5">
                    {r.reasons.map((x, i) => (
                      <li key={i}>{x}</li>
                    ))}
                  </ul>
                </li>
              );
            })}
          </ol>
        </div>
      )}

      <div className="grid gap-1">
        <h3 className="flex items-baseline justify-between font-bold">
          Comments
          <span className="text-sm font-normal text-ink-soft">{review.comments.length === 0 ? 'none yet' : 'click one to see its moment'}</span>
        </h3>
        {review.comments.length > 0 && (
          <ol className="grid max-h-64 gap-1 overflow-auto text-sm">
            {review.comments.map((c) => (
              <li key={c.seq}>
                <button
                  type="button"
                  data-testid="review-comment"
                  data-at-seq={c.atSeq}
                  onClick={() => onSeek(c.atSeq)}
                  className={`grid w-full gap-0.5 rounded-lg border-l-8 px-3 py-2 text-left hover:bg-bubble/20 ${c.atSeq === seq ? 'border-ink bg-bubble/25' : 'border-bubble bg-paper'}`}
                >
                  <span className="text-xs text-ink-soft">
                    <b className="text-ink">{momentOf(c.atSeq)}</b> · {whoMade(c.seq)} · {clock(c.at)}
                  </span>
                  <span className="whitespace-pre-wrap">{c.text}</span>
                </button>
              </li>
            ))}
          </ol>
        )}
      </div>

      {canReview && [...REVIEWABLE, 'returned'].includes(status) && <CommentForm sessionId={sessionId} seq={seq} moment={momentOf(seq)} onStored={onStored} />}
      {canReview && REVIEWABLE.includes(status) && (
        <>
          <ReturnForm sessionId={sessionId} onStored={onStored} />
          <ApproveForm sessionId={sessionId} onStored={onStored} />
        </>
      )}
      {canReview && status === 'live' && <p className="text-sm text-ink-soft">Comments, returns and the approval open once the session has ended.</p>}
      {canReview && status === 'returned' && <p className="text-sm text-ink-soft">Approval opens again once the technician finishes the rework.</p>}
      {!canReview && status !== 'approved' && <p className="text-sm text-ink-soft">Reviewers and admins of the organisation comment on, return and approve the record.</p>}
    </section>
  );
}

function CommentForm({ sessionId, seq, moment, onStored }: { sessionId: string; seq: number; moment: string; onStored: () => Promise<void> }) {
  const [text, setText] = useState('');
  const [err, setErr] = useState<FieldError | null>(null);
  const [busy, setBusy] = useState(false);
  const act = useActId();

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    const cmd = { id: act.get(), sessionId, atSeq: seq, text };
    const parsed = z.safeParse(reviewComment, cmd);
    if (!parsed.success) return setErr(issueOf(parsed.error));
    setErr(null);
    setBusy(true);
    try {
      await post(sessionId, { kind: 'comment', id: cmd.id, atSeq: seq, text: parsed.data.text });
      act.done();
      setText('');
      await onStored();
    } catch (e) {
      setErr(errorOf(e));
    } finally {
      setBusy(false);
    }
  }

  const textError = under(err, 'text');
  const seqError = under(err, 'atSeq');
  const other = formLevel(err, ['text', 'atSeq']);
  return (
    <form onSubmit={(e) => void submit(e)} noValidate className="grid gap-2 border-t-2 border-rule pt-3" aria-labelledby="comment-h">
      <h3 id="comment-h" className="font-bold">
        Pin a comment at <span className="tabular">{moment}</span>
      </h3>
      <label className="grid gap-1 text-sm font-semibold">
        Comment
        <textarea
          name="comment"
          rows={2}
          maxLength={2000}
          value={text}
          onChange={(e) => setText(e.target.value)}
          aria-invalid={textError ? true : undefined}
          className={`rounded-lg border-2 px-2 py-1 text-base font-normal ${textError ? 'border-fail' : 'border-rule'}`}
        />
      </label>
      {textError && <p className="text-sm font-semibold text-fail">Comment: {textError}</p>}
      {seqError && <p className="text-sm font-semibold text-fail">Moment: {seqError}</p>}
      {other && (
        <p role="alert" className="text-sm font-semibold text-fail">
          {other}
        </p>
      )}
      <button type="submit" disabled={busy} className="min-h-11 justify-self-start rounded-lg bg-bubble px-4 font-bold text-ink hover:brightness-95 disabled:opacity-50">
        Pin comment at #{seq}
      </button>
    </form>
  );
}

function ReturnForm({ sessionId, onStored }: { sessionId: string; onStored: () => Promise<void> }) {
  const [reasons, setReasons] = useState<string[]>(['']);
  const [err, setErr] = useState<FieldError | null>(null);
  const [busy, setBusy] = useState(false);
  const act = useActId();

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    const cmd = { id: act.get(), sessionId, reasons };
    const parsed = z.safeParse(reviewReturn, cmd);
    if (!parsed.success) return setErr(issueOf(parsed.error));
    setErr(null);
    setBusy(true);
    try {
      await post(sessionId, { kind: 'return', id: cmd.id, reasons: parsed.data.reasons });
      act.done();
      setReasons(['']);
      await onStored();
    } catch (e) {
      setErr(errorOf(e));
    } finally {
      setBusy(false);
    }
  }

  const listError = err?.field === 'reasons' ? err.message : null;
  const other = formLevel(err, ['reasons']);
  return (
    <form onSubmit={(e) => void submit(e)} noValidate className="grid gap-2 border-t-2 border-rule pt-3" aria-labelledby="return-h">
      <h3 id="return-h" className="font-bold">
        Return for rework
      </h3>
      <p className="text-sm text-ink-soft">The technician sees these reasons in the field view and takes the session up again.</p>
      {reasons.map((r, i) => {
        const error = err?.field === `reasons.${i}` ? err.message : null;
        return (
          <div key={i} className="grid gap-1">
            <div className="flex items-end gap-2">
              <label className="grid flex-1 gap-1 text-sm font-semibold">
                Reason {reasons.length > 1 ? i + 1 : ''}
                <input
                  name={`reason-${i}`}
                  value={r}
                  maxLength={500}
                  onChange={(e) => setReasons((all) => all.map((x, j) => (j === i ? e.target.value : x)))}
                  aria-invalid={error ? true : undefined}
                  className={`min-h-11 rounded-lg border-2 px-2 text-base font-normal ${error ? 'border-fail' : 'border-rule'}`}
                />
              </label>
              {reasons.length > 1 && (
                <button type="button" onClick={() => setReasons((all) => all.filter((_, j) => j !== i))} className="min-h-11 px-2 text-sm underline underline-offset-4" aria-label={`Remove reason ${i + 1}`}>
                  Remove
                </button>
              )}
            </div>
            {error && <p className="text-sm font-semibold text-fail">Reason {i + 1}: {error}</p>}
          </div>
        );
      })}
      {listError && <p className="text-sm font-semibold text-fail">Reasons: {listError}</p>}
      {other && (
        <p role="alert" className="text-sm font-semibold text-fail">
          {other}
        </p>
      )}
      <div className="flex flex-wrap gap-2">
        <button type="button" onClick={() => setReasons((all) => [...all, ''])} disabled={reasons.length >= 20} className="min-h-11 rounded-lg border-2 border-ink px-3 font-semibold hover:bg-paper disabled:opacity-40">
          Add a reason
        </button>
        <button type="submit" disabled={busy} className="min-h-11 rounded-lg bg-fail px-4 font-bold text-white hover:brightness-110 disabled:opacity-50">
          Return for rework
        </button>
      </div>
    </form>
  );
}

function ApproveForm({ sessionId, onStored }: { sessionId: string; onStored: () => Promise<void> }) {
  const [name, setName] = useState('');
  const [err, setErr] = useState<FieldError | null>(null);
  const [busy, setBusy] = useState(false);
  const pad = useRef<SignaturePadHandle>(null);
  const act = useActId();

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    const drawn = pad.current?.read() ?? { ok: false as const, reason: 'the pad is not ready' };
    if (!drawn.ok) return setErr({ field: 'signature', message: drawn.reason });
    const cmd = { id: act.get(), sessionId, name, signature: drawn.signature };
    const parsed = z.safeParse(reviewApprove, cmd);
    if (!parsed.success) return setErr(issueOf(parsed.error));
    setErr(null);
    setBusy(true);
    try {
      await post(sessionId, { kind: 'approve', id: cmd.id, name: parsed.data.name, signature: parsed.data.signature });
      act.done();
      await onStored();
    } catch (e) {
      setErr(errorOf(e));
    } finally {
      setBusy(false);
    }
  }

  const nameError = under(err, 'name');
  const other = formLevel(err, ['name', 'signature']);
  return (
    <form onSubmit={(e) => void submit(e)} noValidate className="grid gap-2 border-t-2 border-rule pt-3" aria-labelledby="approve-h">
      <h3 id="approve-h" className="font-bold">
        Approve the record
      </h3>
      <p className="text-sm text-ink-soft">You sign off the record as it stands: the figures, the moves and the notes. It cannot be changed afterwards.</p>
      <label className="grid gap-1 text-sm font-semibold">
        Your name, typed
        <input
          name="approver-name"
          value={name}
          maxLength={120}
          autoComplete="name"
          onChange={(e) => setName(e.target.value)}
          aria-invalid={nameError ? true : undefined}
          className={`min-h-11 rounded-lg border-2 px-2 text-base font-normal ${nameError ? 'border-fail' : 'border-rule'}`}
        />
      </label>
      {nameError && <p className="text-sm font-semibold text-fail">Name: {nameError}</p>}
      <SignatureField ref={pad} label="Your signature, drawn" error={under(err, 'signature')} disabled={busy} onChange={() => err?.field.startsWith('signature') && setErr(null)} />
      {other && (
        <p role="alert" className="text-sm font-semibold text-fail">
          {other}
        </p>
      )}
      <button type="submit" disabled={busy} className="min-h-12 justify-self-start rounded-lg bg-pass px-5 text-lg font-bold text-white hover:brightness-110 disabled:opacity-50">
        Approve
      </button>
    </form>
  );
}
