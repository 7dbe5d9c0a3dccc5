import { z } from 'zod';
import { userSchema, type InviteUserRequest, type UpdateUserRequest, type User } from '@shared/api/users';
import { http } from './http';

export function listUsers(): Promise<User[]> {
  return http.get('/users', { schema: z.array(userSchema) });
}

/** Creates the account and sends the invitation mail with a set-password link. */
export function inviteUser(body: InviteUserRequest): Promise<User> {
  return http.post('/users/invitations', body, { schema: userSchema });
}

export function updateUser(userId: number, body: UpdateUserRequest): Promise<User> {
  return http.patch(`/users/${userId}`, body, { schema: userSchema });
}
