// Session and token carry the user id and unit-scoped roles (types augmented, never cast).
import type { Grant } from "@/lib/auth/roles";

declare module "next-auth" {
  interface User {
    id: string;
    email: string;
    name: string;
    grants: Grant[];
  }
  interface Session {
    user: { id: string; name: string; email: string; grants: Grant[] };
  }
}

declare module "next-auth/jwt" {
  interface JWT {
    userId: string;
    grants: Grant[];
  }
}
