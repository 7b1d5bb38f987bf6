import type { Role } from '@/lib/vocabulary/roles';

declare module 'next-auth' {
  interface Session {
    user: { id: number; email: string; name: string; role: Role; sid: string; sv: number };
  }
  interface User {
    id: string;
    role: Role;
    sv?: number;
  }
}

declare module 'next-auth/jwt' {
  interface JWT {
    uid?: number;
    role?: Role;
    sid?: string;
    sv?: number;
  }
}
