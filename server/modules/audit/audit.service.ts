import { HttpError } from '../../http/errors';
import type { RigRepository } from '../rig/rig.repository';
import type { InspectionsRepository } from '../inspections/inspections.repository';
import { parseHead, type AuditRepository, type ChainCheck, type ClearanceEntry } from './audit.repository';

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
export function auditService(deps: { audit: AuditRepository; rig: Pick<RigRepository, 'clearanceStates'>; inspections: Pick<InspectionsRepository, 'clearancesOnRecord'> }) {
  const { audit, rig, inspections } = deps;

  async function clearanceMismatches(): Promise<ClearanceMismatch[]> {
    const points = await audit.pointsAsStored();
    const rows = await rig.clearanceStates('all');
    const out: ClearanceMismatch[] = [];
    for (const p of points) {
      const c = rows.get(p.id) ?? null;
      const say = (message: string) => out.push({ pointId: p.id, label: p.label, message: `Point ${p.label}: ${message}` });
      if (!c && p.lastClearedAt) say(`marked cleared on ${p.lastClearedAt} with no inspection behind it.`);
      else if (c && !p.lastClearedAt) say(`its clearance by inspection #${c.inspectionId} (${c.at}) is missing from the point’s record.`);
      else if (c && !sameInstant(c.at, p.lastClearedAt)) say(`marked cleared on ${p.lastClearedAt}, but its latest clearance, inspection #${c.inspectionId}, was on ${c.at}.`);
      if (!c) {
        if (p.clearanceVoidedAt) say(`marked voided on ${p.clearanceVoidedAt} with no clearance on record.`);
        continue;
      }
      if (c.voidedAt && !p.clearanceVoidedAt) say(`shown as cleared, but its clearance was voided on ${c.voidedAt}.`);
      else if (!c.voidedAt && p.clearanceVoidedAt) say(`marked voided on ${p.clearanceVoidedAt} with no void on record.`);
      else if (!sameInstant(c.voidedAt, p.clearanceVoidedAt)) say(`marked voided on ${p.clearanceVoidedAt}, but the void on record is of ${c.voidedAt}.`);
    }
    return out;
  }

  /**
   * Every clearance and every void on record must have been written with its audit entry, and
   * every one the audit chain names must still be on record: an inspection row inserted by hand,
   * or a void row deleted, is reported by the point's label.
   */
  async function recordsOutsideTheChain(): Promise<ClearanceMismatch[]> {
    const labels = new Map((await audit.pointsAsStored()).map((p) => [p.id, p.label]));
    const cleared = await inspections.clearancesOnRecord();
    const voids = await audit.clearanceVoidsOnRecord();
    const audited = await audit.clearanceEntries();
    const named = (action: ClearanceEntry['action']) => new Map(audited.filter((a) => a.action === action).map((a) => [a.inspectionId, a]));
    const clearedInChain = named('point.cleared');
    const voidsInChain = named('point.clearance_voided');
    const out: ClearanceMismatch[] = [];
    const say = (pointId: number, message: string) => {
      const label = labels.get(pointId) ?? `#${pointId}`;
      out.push({ pointId, label, message: `Point ${label}: ${message}` });
    };
    const clearedIds = new Set(cleared.map((c) => c.id));
    for (const c of cleared) if (!clearedInChain.has(c.id)) say(c.pointId, `inspection #${c.id} clearing it on ${c.inspectedAt} is not in the audit chain: it was not recorded through Loftwise.`);
    for (const [id, a] of clearedInChain) if (!clearedIds.has(id)) say(a.pointId, `its clearance by inspection #${id} of ${a.at}, in the audit chain, is missing from the inspection records.`);
    const voidIds = new Set(voids.map((v) => v.inspectionId));
    // Voids carried over by migration 007 predate their audit entries; a void only ever blocks.
    for (const v of voids) if (v.reason !== 'voided_before_records' && !voidsInChain.has(v.inspectionId)) say(v.pointId, `the void of its clearance on ${v.at} is not in the audit chain.`);
    for (const [id, a] of voidsInChain) if (!voidIds.has(id)) say(a.pointId, `the void of its clearance (inspection #${id}) on ${a.at}, in the audit chain, is missing from the records: the point may read as cleared.`);
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
      const mismatches = [...(await clearanceMismatches()), ...(await recordsOutsideTheChain())];
      const problems = [chain.problem, chain.publishedHead?.problem && chain.publishedHead.problem !== chain.problem ? chain.publishedHead.problem : null, ...mismatches.map((m) => m.message)].filter((p): p is string => Boolean(p));
      return { ...chain, ok: chain.ok && mismatches.length === 0, problem: problems[0] ?? null, problems, clearanceMismatches: mismatches };
    },
  };
}
export type AuditService = ReturnType<typeof auditService>;
