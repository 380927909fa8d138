import type { Role } from '@/db/schema';

declare module 'next-auth' {
  interface User {
    role: Role;
    organisationId: string;
    /** lib/auth/token.ts passwordStamp of the user's password hash at sign-in. */
    passwordStamp?: string;
  }
  interface Session {
    user: { id: string; name?: string | null; email?: string | null; role: Role; organisationId: string };
  }
}

declare module 'next-auth/jwt' {
  interface JWT {
    role: Role;
    organisationId: string;
    /** The password hash's stamp at sign-in; a token whose stamp no longer matches the user row is refused. */
    pwd?: string;
    /** Seconds since the epoch when the password was typed; kept when next-auth renews the token. */
    signedInAt?: number;
  }
}
