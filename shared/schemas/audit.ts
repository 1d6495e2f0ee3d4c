import { z } from 'zod';
import { idSchema, instantSchema } from './common';
import { cursorSchema, idKey, limitSchema } from './page';

/** The owner's audit list: who, what, which record, when; newest first, keyset on id. */
const auditFilterFields = {
    actorId: idSchema.optional(),
    action: z.string().trim().max(60, 'An action is at most 60 characters').regex(/^[a-z_.]*$/, 'Pick an action from the list').optional(),
    entity: z.string().trim().max(30, 'A record type is at most 30 characters').regex(/^[a-z_]*$/, 'Pick a record type from the list').optional(),
    entityId: idSchema.optional(),
    from: instantSchema.optional(),
    to: instantSchema.optional(),
};
type Checked = { from?: string; to?: string; entity?: string; entityId?: number };
const checks = <S extends z.ZodType<Checked>>(s: S) =>
  s
    .refine((q) => !q.from || !q.to || Date.parse(q.from) <= Date.parse(q.to), { message: 'The end of the range comes before its start', path: ['to'] })
    .refine((q) => q.entityId === undefined || !!q.entity, { message: 'Say which kind of record the number belongs to', path: ['entity'] });
export const auditFilters = checks(z.object(auditFilterFields));
export type AuditFilters = z.infer<typeof auditFilters>;

export const auditListQuery = checks(z.object({ ...auditFilterFields, cursor: cursorSchema(idKey).optional(), limit: limitSchema.optional() }));
export type AuditListQuery = z.infer<typeof auditListQuery>;

export const auditEntrySchema = z.object({
  id: z.number(),
  at: z.string(),
  actorId: z.number().nullable(),
  actor: z.string().nullable(),
  action: z.string(),
  entity: z.string(),
  entityId: z.number().nullable(),
  before: z.unknown(),
  after: z.unknown(),
});
export type AuditEntry = z.infer<typeof auditEntrySchema>;

/** What the filters can pick from: the actions and record types present in the trail. */
export const auditFacetsSchema = z.object({ actions: z.array(z.string()), entities: z.array(z.string()) });
export type AuditFacets = z.infer<typeof auditFacetsSchema>;
