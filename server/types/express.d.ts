import type { User as CristaeUser } from '@/schemas/user';

declare global {
  namespace Express {
    // passport's req.user is the signed-in Cristae account.
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends CristaeUser {}
  }
}
export {};
