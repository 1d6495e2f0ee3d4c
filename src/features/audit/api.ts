import { queryOptions } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../../lib/api-client';

export const auditVerifySchema = z.object({ ok: z.boolean(), entries: z.number(), firstBadId: z.number().nullable(), problem: z.string().nullable() });
export type AuditVerify = z.infer<typeof auditVerifySchema>;
export const auditEntrySchema = z.object({
  id: z.number(),
  at: z.string(),
  actor: z.string().nullable(),
  action: z.string(),
  entity: z.string(),
  entityId: z.number().nullable(),
});
export type AuditEntry = z.infer<typeof auditEntrySchema>;

export const auditQueries = {
  all: ['audit'] as const,
  // Checked when the owner asks, not on every visit: it reads the whole chain.
  verify: () => queryOptions({ queryKey: [...auditQueries.all, 'verify'], queryFn: () => api('/audit/verify', { schema: auditVerifySchema }), enabled: false, staleTime: 0 }),
  recent: (limit = 25) => queryOptions({ queryKey: [...auditQueries.all, 'recent', limit], queryFn: () => api(`/audit?limit=${limit}`, { schema: z.array(auditEntrySchema) }) }),
};
