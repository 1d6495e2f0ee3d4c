import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api-client';
import { policyPreviewSchema, studioSchema, type PolicyPreviewBody, type UpdateStudio } from '../../../shared/schemas/studio';

export const studioQueries = {
  all: ['studio'] as const,
  detail: () => queryOptions({ queryKey: [...studioQueries.all, 'detail'], queryFn: () => api('/studio', { schema: studioSchema }), staleTime: 5 * 60_000 }),
};

export function useUpdateStudio() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: UpdateStudio) => api('/studio', { method: 'PATCH', body, schema: studioSchema }),
    // Every derived answer (statuses, load checks, the calendar) follows the policy.
    onSuccess: (data) => {
      qc.setQueryData(studioQueries.detail().queryKey, data);
      void qc.invalidateQueries({ predicate: (q) => q.queryKey[0] !== studioQueries.all[0] });
    },
  });
}

/** What a proposed policy would do now; changes nothing. */
export function usePolicyPreview() {
  return useMutation({
    mutationFn: (body: PolicyPreviewBody) => api('/studio/policy/preview', { method: 'POST', body, schema: policyPreviewSchema }),
  });
}
