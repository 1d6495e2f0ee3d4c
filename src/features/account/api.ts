import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api-client';
import { myPreferencesSchema, type MyPreferences } from '../../../shared/schemas/staff';

export const accountQueries = {
  all: ['account'] as const,
  preferences: () => queryOptions({ queryKey: [...accountQueries.all, 'preferences'], queryFn: () => api('/me/preferences', { schema: myPreferencesSchema }) }),
};

export function useSavePreferences() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: MyPreferences) => api('/me/preferences', { method: 'PATCH', body, schema: myPreferencesSchema }),
    onSuccess: (data) => qc.setQueryData(accountQueries.preferences().queryKey, data),
  });
}
