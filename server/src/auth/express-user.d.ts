/// <reference types="passport" />
import type { User as CartoucheUser } from '../models/user.ts';

// passport puts the signed-in person on req.user: in Cartouche that is the User model instance.
declare global {
  namespace Express {
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends CartoucheUser {}
  }
}
