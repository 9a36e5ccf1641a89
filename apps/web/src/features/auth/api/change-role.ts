import { useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { roleSchema } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';
import { usersQueryOptions, type UserSummary } from './get-users';

export const changeRoleInputSchema = z.object({ userId: z.string().uuid(), role: roleSchema });
export type ChangeRoleInput = z.infer<typeof changeRoleInputSchema>;

export const changeRole = ({ userId, role }: ChangeRoleInput) =>
  apiFetch<{ user: UserSummary }>(`/api/users/${userId}/role`, {
    method: 'PATCH',
    body: JSON.stringify({ role }),
  });

export const useChangeRole = () => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: changeRole,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: usersQueryOptions().queryKey }),
  });
};
