import bcrypt from 'bcryptjs';
import type { NextAuthOptions } from 'next-auth';
import CredentialsProvider from 'next-auth/providers/credentials';
import { z } from 'zod';
import { db } from '@/db/client';
import { getUserByEmail } from '@/db/queries/users';
import { env } from '@/lib/env';

const credentials = z.object({ email: z.string().trim().email(), password: z.string().min(1).max(200) });

/** A hash of a password nobody has: compared against when the e-mail is unknown, so timing does not tell. */
const NO_USER_HASH = bcrypt.hashSync('levelwire-no-such-user', 10);

export const authOptions: NextAuthOptions = {
  secret: env().NEXTAUTH_SECRET,
  session: { strategy: 'jwt', maxAge: 12 * 60 * 60 },
  pages: { signIn: '/sign-in' },
  providers: [
    CredentialsProvider({
      name: 'Levelwire',
      credentials: { email: { label: 'E-mail', type: 'email' }, password: { label: 'Password', type: 'password' } },
      async authorize(raw) {
        const parsed = credentials.safeParse(raw);
        if (!parsed.success) return null;
        const user = await getUserByEmail(db(), { email: parsed.data.email });
        const ok = await bcrypt.compare(parsed.data.password, user?.passwordHash ?? NO_USER_HASH);
        if (!user || !ok || !user.active) return null;
        return { id: user.id, name: user.name, email: user.email, role: user.role, organisationId: user.organisationId };
      },
    }),
  ],
  callbacks: {
    jwt({ token, user }) {
      if (user) {
        token.sub = user.id;
        token.role = user.role;
        token.organisationId = user.organisationId;
      }
      return token;
    },
    session({ session, token }) {
      session.user = {
        ...session.user,
        id: token.sub ?? '',
        role: token.role,
        organisationId: token.organisationId,
      };
      return session;
    },
  },
};
