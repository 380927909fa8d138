import type { Role } from '@/db/schema';

declare module 'next-auth' {
  interface User {
    role: Role;
    organisationId: string;
  }
  interface Session {
    user: { id: string; name?: string | null; email?: string | null; role: Role; organisationId: string };
  }
}

declare module 'next-auth/jwt' {
  interface JWT {
    role: Role;
    organisationId: string;
  }
}
