import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../../lib/api-client';
import { instructorListSchema, userSchema, type CreateUser, type UpdateUser } from '../../../shared/schemas/staff';

export const staffQueries = {
  all: ['staff'] as const,
  list: () => queryOptions({ queryKey: [...staffQueries.all, 'list'], queryFn: () => api('/users', { schema: z.array(userSchema) }) }),
  /** Active instructors, name-sorted by the server: for every role (the staff list is the desk's only). */
  instructors: () => queryOptions({ queryKey: [...staffQueries.all, 'instructors'], queryFn: () => api('/instructors', { schema: instructorListSchema }) }),
};

export function useStaffMutations() {
  const qc = useQueryClient();
  const invalidate = () => qc.invalidateQueries({ queryKey: staffQueries.all });
  return {
    create: useMutation({ mutationFn: (body: CreateUser) => api('/users', { method: 'POST', body, schema: userSchema }), onSuccess: invalidate }),
    update: useMutation({
      mutationFn: ({ id, ...body }: UpdateUser & { id: number }) => api(`/users/${id}`, { method: 'PATCH', body, schema: userSchema }),
      onSuccess: invalidate,
    }),
    resetPassword: useMutation({ mutationFn: ({ id, password }: { id: number; password: string }) => api(`/users/${id}/password`, { method: 'POST', body: { password } }) }),
  };
}
