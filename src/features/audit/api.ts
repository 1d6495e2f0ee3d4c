import { infiniteQueryOptions, queryOptions } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../../lib/api-client';
import { studioMidnight } from '../../lib/studio-day';
import { auditEntrySchema, auditFacetsSchema, auditFilters, type AuditFilters } from '../../../shared/schemas/audit';
import { pageSchema } from '../../../shared/schemas/page';
import { userSchema } from '../../../shared/schemas/staff';

const headSchema = z.object({ count: z.number(), hash: z.string() });
export const auditVerifySchema = z.object({
  ok: z.boolean(),
  entries: z.number(),
  firstBadId: z.number().nullable(),
  problem: z.string().nullable(),
  /** Every problem in words: the chain, a published head, each point whose clearance records disagree. */
  problems: z.array(z.string()).default([]),
  head: headSchema.optional(),
  publishedHead: headSchema.extend({ found: z.boolean(), problem: z.string().nullable() }).optional(),
});
export type AuditVerify = z.infer<typeof auditVerifySchema>;
export { auditEntrySchema, type AuditEntry } from '../../../shared/schemas/audit';

/** The audit page's filters as the owner types them: days in the studio's zone, ids as text. */
export interface AuditFilterInput {
  actorId?: string;
  action?: string;
  entity?: string;
  entityId?: string;
  from?: string;
  to?: string;
}

/**
 * Checks the typed filters with the shared schema (the server checks the same) and answers the
 * query string, or the field messages to show beside the fields.
 */
export function auditSearch(f: AuditFilterInput, timeZone: string): { search: string; errors: Record<string, string> } {
  const raw = {
    actorId: f.actorId || undefined,
    action: f.action || undefined,
    entity: f.entity || undefined,
    entityId: f.entityId?.trim() || undefined,
    from: f.from ? studioMidnight(f.from, timeZone) : undefined,
    to: f.to ? studioMidnight(f.to, timeZone, true) : undefined,
  };
  const parsed = auditFilters.safeParse(raw);
  if (!parsed.success) {
    const errors: Record<string, string> = {};
    for (const issue of parsed.error.issues) errors[String(issue.path[0] ?? 'form')] ??= issue.message;
    return { search: '', errors };
  }
  const s = new URLSearchParams();
  for (const [k, v] of Object.entries(parsed.data as AuditFilters)) if (v !== undefined && v !== '') s.set(k, String(v));
  return { search: s.toString(), errors: {} };
}

export const auditQueries = {
  all: ['audit'] as const,
  // Checked when the owner asks, not on every visit: it reads the whole chain.
  verify: (head = '') =>
    queryOptions({ queryKey: [...auditQueries.all, 'verify', head], queryFn: () => api(`/audit/verify${head ? `?head=${encodeURIComponent(head)}` : ''}`, { schema: auditVerifySchema }), enabled: false, staleTime: 0 }),
  recent: (limit = 25) => queryOptions({ queryKey: [...auditQueries.all, 'recent', limit], queryFn: async () => (await api(`/audit?limit=${limit}`, { schema: pageSchema(auditEntrySchema) })).items }),
  /** Entries matching a checked query string, newest first, a page at a time. */
  list: (search: string) =>
    infiniteQueryOptions({
      queryKey: [...auditQueries.all, 'list', search],
      queryFn: ({ pageParam }) => {
        const s = new URLSearchParams(search);
        if (pageParam) s.set('cursor', pageParam);
        const q = s.toString();
        return api(`/audit${q ? `?${q}` : ''}`, { schema: pageSchema(auditEntrySchema) });
      },
      initialPageParam: undefined as string | undefined,
      getNextPageParam: (last) => last.nextCursor ?? undefined,
    }),
  facets: () => queryOptions({ queryKey: [...auditQueries.all, 'facets'], queryFn: () => api('/audit/facets', { schema: auditFacetsSchema }) }),
  /** Staff (current and former) for the "who" filter; kept under this feature's keys. */
  staff: () => queryOptions({ queryKey: [...auditQueries.all, 'staff'], queryFn: () => api('/users', { schema: z.array(userSchema) }), staleTime: 60_000 }),
};
