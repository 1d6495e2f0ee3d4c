import type { Db } from '../../db/knex';
import { HttpError } from '../../http/errors';
import type { RigRepository } from '../rig/rig.repository';
import { parseHead, type AuditRepository, type ChainCheck } from './audit.repository';

export interface ClearanceMismatch {
  pointId: number;
  label: string;
  message: string;
}

export interface AuditVerification extends ChainCheck {
  /** The chain and the clearance records, as a list of problems in words. */
  problems: string[];
  /** Points whose stored clearance columns disagree with their clearance and void rows. */
  clearanceMismatches: ClearanceMismatch[];
}

const sameInstant = (a: string | null, b: string | null) => (a === null || b === null ? a === b : Date.parse(a) === Date.parse(b));

/**
 * `GET /api/audit/verify`: the keyed chain (and a head published earlier, when given), and each
 * point's clearance columns against the append-only rows the status is derived from. A hand edit
 * of `points.last_cleared_at` cannot clear a point (the status reads the rows), and it is reported
 * here by the point's label.
 */
export function auditService(deps: { db: Db; audit: AuditRepository; rig: RigRepository }) {
  const { db, audit, rig } = deps;

  async function clearanceMismatches(): Promise<ClearanceMismatch[]> {
    const points = (await db('points').orderBy('label').select('id', 'label', 'last_cleared_at', 'clearance_voided_at')) as Array<{ id: number; label: string; last_cleared_at: string | null; clearance_voided_at: string | null }>;
    const rows = await rig.clearanceStates('all');
    const out: ClearanceMismatch[] = [];
    for (const p of points) {
      const c = rows.get(p.id) ?? null;
      const say = (message: string) => out.push({ pointId: p.id, label: p.label, message: `Point ${p.label}: ${message}` });
      if (!c && p.last_cleared_at) say(`marked cleared on ${p.last_cleared_at} with no inspection behind it.`);
      else if (c && !p.last_cleared_at) say(`its clearance by inspection #${c.inspectionId} (${c.at}) is missing from the point’s record.`);
      else if (c && !sameInstant(c.at, p.last_cleared_at)) say(`marked cleared on ${p.last_cleared_at}, but its latest clearance, inspection #${c.inspectionId}, was on ${c.at}.`);
      if (!c) {
        if (p.clearance_voided_at) say(`marked voided on ${p.clearance_voided_at} with no clearance on record.`);
        continue;
      }
      if (c.voidedAt && !p.clearance_voided_at) say(`shown as cleared, but its clearance was voided on ${c.voidedAt}.`);
      else if (!c.voidedAt && p.clearance_voided_at) say(`marked voided on ${p.clearance_voided_at} with no void on record.`);
      else if (!sameInstant(c.voidedAt, p.clearance_voided_at)) say(`marked voided on ${p.clearance_voided_at}, but the void on record is of ${c.voidedAt}.`);
    }
    return out;
  }

  return {
    async verify(headText?: string): Promise<AuditVerification> {
      let published;
      if (headText !== undefined) {
        published = parseHead(headText);
        if (!published) throw new HttpError(400, 'invalid_request', 'A head reads count:hash, for example 42:3f… (64 hexadecimal characters), as printed on an export or a digest.', { source: 'query', fields: { head: 'Write it as count:hash' } });
      }
      const chain = await audit.verify(published ?? undefined);
      const mismatches = await clearanceMismatches();
      const problems = [chain.problem, chain.publishedHead?.problem && chain.publishedHead.problem !== chain.problem ? chain.publishedHead.problem : null, ...mismatches.map((m) => m.message)].filter((p): p is string => Boolean(p));
      return { ...chain, ok: chain.ok && mismatches.length === 0, problem: problems[0] ?? null, problems, clearanceMismatches: mismatches };
    },
  };
}
export type AuditService = ReturnType<typeof auditService>;
