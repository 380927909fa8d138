import bcrypt from 'bcryptjs';
import type { NextAuthOptions } from 'next-auth';
import CredentialsProvider from 'next-auth/providers/credentials';
import { z } from 'zod';
import { db } from '@/db/client';
import { getUserByEmail } from '@/db/queries/users';
import { env } from '@/lib/env';
import { clientAddress } from './client-address';
import { signInLimiter } from './sign-in-limit';
import { lockMessage, SIGN_IN_UNAVAILABLE } from './sign-in-messages';
import { passwordStamp, SESSION_MAX_AGE_SECONDS } from './token';

const credentials = z.object({ email: z.string().trim().email(), password: z.string().min(1).max(200) });

/** A hash of a password nobody has: compared against when the e-mail is unknown, so timing does not tell. */
const NO_USER_HASH = bcrypt.hashSync('levelwire-no-such-user', 10);

/** A refusal whose message is meant for the sign-in page (next-auth passes a thrown message on as `?error=`). */
class SignInRefused extends Error {}

/**
 * next-auth 4 with JWT sessions. Its CSRF check on the credentials POST stays as it comes (a double-submit
 * cookie). A session ends 12 h after its token was last issued, and in any case 12 h after the password was typed
 * (`signedInAt`, checked by actorFromToken): next-auth re-issues a JWT whenever /api/auth/session is read, and its
 * `updateAge` applies only to database sessions, so the sign-in time is what bounds a working day.
 */
export const authOptions: NextAuthOptions = {
  secret: env().NEXTAUTH_SECRET,
  session: { strategy: 'jwt', maxAge: SESSION_MAX_AGE_SECONDS },
  // The token's own expiry, which otherwise stays at next-auth's 30 days while the cookie holding it lasts 12 h.
  jwt: { maxAge: SESSION_MAX_AGE_SECONDS },
  pages: { signIn: '/sign-in' },
  providers: [
    CredentialsProvider({
      name: 'Levelwire',
      credentials: { email: { label: 'E-mail', type: 'email' }, password: { label: 'Password', type: 'password' } },
      async authorize(raw, req) {
        const parsed = credentials.safeParse(raw);
        if (!parsed.success) return null;
        const { email, password } = parsed.data;
        const address = clientAddress(req?.headers, env().TRUSTED_PROXIES);
        try {
          const limiter = signInLimiter();
          const lock = await limiter.lockFor(email, address);
          if (lock) throw new SignInRefused(lockMessage(lock));
          const user = await getUserByEmail(db(), { email });
          const ok = await bcrypt.compare(password, user?.passwordHash ?? NO_USER_HASH);
          if (!user || !ok || !user.active) {
            const nowLocked = await limiter.recordFailure(email, address);
            if (nowLocked) throw new SignInRefused(lockMessage(nowLocked));
            return null;
          }
          await limiter.recordSuccess(email, address);
          return { id: user.id, name: user.name, email: user.email, role: user.role, organisationId: user.organisationId, passwordStamp: passwordStamp(user.passwordHash) };
        } catch (e) {
          if (e instanceof SignInRefused) throw e;
          // Anything else (the database down) must not reach the page's `?error=` with its internals.
          console.error('[levelwire] sign-in failed on the server', e);
          throw new Error(SIGN_IN_UNAVAILABLE);
        }
      },
    }),
  ],
  callbacks: {
    jwt({ token, user }) {
      if (user) {
        token.sub = user.id;
        token.role = user.role;
        token.organisationId = user.organisationId;
        token.pwd = user.passwordStamp;
        token.signedInAt = Math.floor(Date.now() / 1000);
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
