import type { SessionUser as CristaeUser } from '@/schemas/user';

declare global {
  namespace Express {
    // passport's req.user is the signed-in Cristae account (with its forced-change flag).
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends CristaeUser {}
  }
}
export {};
