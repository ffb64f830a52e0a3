/** Who is acting, for audit events written by endpoints and page form handlers. */
import { clientAddressOf } from '../auth/client-address';
import type { SessionUser } from '../session-user';
import type { Actor } from '../users';

export function actorOf(user: SessionUser, context: { clientAddress: string }): Actor {
  return { user, ip: clientAddressOf(context) };
}
