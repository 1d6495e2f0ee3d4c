import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api-client';
import { studioSchema, type UpdateStudio } from '../../../shared/schemas/studio';

export const studioQueries = {
  all: ['studio'] as const,
  detail: () => queryOptions({ queryKey: [...studioQueries.all, 'detail'], queryFn: () => api('/studio', { schema: studioSchema }), staleTime: 5 * 60_000 }),
};

export function useUpdateStudio() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: UpdateStudio) => api('/studio', { method: 'PATCH', body, schema: studioSchema }),
    onSuccess: (data) => qc.setQueryData(studioQueries.detail().queryKey, data),
  });
}
