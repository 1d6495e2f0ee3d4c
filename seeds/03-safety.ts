import type { Db } from '../server/db/knex';
import { auditRepository, type AuditInput } from '../server/modules/audit/audit.repository';
import { gearSnapshot, loadSnapshots, type SnapshotBundle } from '../server/modules/rig/point-snapshots';
import { rigRepository, type VoidCause } from '../server/modules/rig/rig.repository';
import { studioRepository } from '../server/modules/studio/studio.repository';
import { addStudioDays, inspectionChecklist, pathConfigOf, policyClearanceEnd, preuseChecklist, splitPath, studioDay, type GearSnapshot, type LinkSnapshot } from '../shared/clearance';
import type { Policy } from '../shared/schemas/policy';
import { INSTRUCTOR, intervalDaysOf, localTime, RIGGER, userIdByEmail } from './demo-data';
import { clearancePlans, drop, faultPlans, gearInspectionPlans, pathAtClearances, pathChange, preuseAttention, preuseSkipped, PREVIOUS_ROUND_DAYS, retirement } from './demo-history';
import { slotClock, weeklyClasses } from './demo-week';

type Item = { key: string; label: string; result: 'pass' | 'attention' | 'fail'; note: string; gearId: number | null };

const worst = (items: Item[]) => (items.some((i) => i.result === 'fail') ? 'fail' : items.some((i) => i.result === 'attention') ? 'attention' : 'pass');

/**
 * The demo studio's inspection and fault history, so that right after a fresh start the rig shows
 * every state a point can be in (see demo-history.ts). Rows and audit entries take the shapes the
 * inspections, faults and rig services write. Inspections are append-only, so this step runs only
 * while there are none; audit entries go through the hash chain in time order.
 */
export async function seedSafety(trx: Db, now: Date, auditKey: string): Promise<void> {
  if (await trx('inspections').first('id')) return;
  const { policy } = await studioRepository(trx).get(trx);
  const tz = policy.timeZone;
  const ago = (days: number, hhmm: string) => localTime(now, -days, hhmm, tz);
  const rig = rigRepository(trx);
  const rigger = await userIdByEmail(trx, RIGGER);
  const instructor = await userIdByEmail(trx, INSTRUCTOR);
  const audits: Array<{ at: Date; entry: AuditInput }> = [];
  const audit = (at: Date, entry: AuditInput) => audits.push({ at, entry });
  const voids: Array<{ pointId: number; at: Date; reason: VoidCause['reason']; source: string; actorId: number }> = [];

  const bundles = new Map((await loadSnapshots(trx, rig, {}, trx)).map((b) => [b.point.label, b]));
  const point = (label: string): SnapshotBundle => bundles.get(label)!;
  const gearBySerial = async (serial: string): Promise<GearSnapshot> => {
    const { id } = (await trx('gear_items').where({ serial }).first('id')) as { id: number };
    return gearSnapshot((await rig.gearByIds([id], trx))[0]);
  };
  const gearOn = (label: string, kind?: string): GearSnapshot => point(label).snapshot.links.find((l) => l.gear.kind === kind)!.gear;
  /** The path as it hung before later swaps (demo-history's pathAtClearances). */
  const pathAtClearance = async (label: string): Promise<LinkSnapshot[]> => {
    const swapped = pathAtClearances[label] ?? {};
    return Promise.all(point(label).snapshot.links.map(async (l, i) => (swapped[i] ? { ...l, gear: await gearBySerial(swapped[i]) } : l)));
  };

  const inspect = async (row: Record<string, unknown>, at: Date, items: Item[], result = worst(items)): Promise<number> => {
    const [ins] = await trx('inspections').insert({ ...row, inspected_at: at.toISOString(), studio_day: studioDay(at, tz), result }).returning('id');
    const inspectionId = (ins as { id: number }).id;
    if (items.length) await trx('inspection_items').insert(items.map((i) => ({ inspection_id: inspectionId, key: i.key, label: i.label, result: i.result, note: i.note, gear_id: i.gearId })));
    return inspectionId;
  };
  const renew = (gear: GearSnapshot, at: Date) => trx('gear_items').where({ id: gear.id }).update({ inspected_until: addStudioDays(at, intervalDaysOf(gear.kind, policy), tz).toISOString() });

  // 1. Clearances: the round before the latest, then the latest, each a periodic inspection with no fail.
  for (const plan of clearancePlans) {
    const b = point(plan.label);
    const path = await pathAtClearance(plan.label);
    for (const [days, latest] of [[plan.daysAgo + PREVIOUS_ROUND_DAYS, false], [plan.daysAgo, true]] as const) {
      const at = ago(days, plan.time);
      const watch = latest ? plan.attention : undefined;
      const watchKey = watch ? (watch.item === 'structure' ? 'structure' : `link:${path[watch.item].gear.id}`) : null;
      const items: Item[] = inspectionChecklist(b.point, path).map((c) => ({ key: c.key, label: c.label, gearId: c.gearId ?? null, result: c.key === watchKey ? 'attention' : 'pass', note: c.key === watchKey ? watch!.note : '' }));
      const until = clearanceEnd(path, at, policy);
      // The story clears a sound point: as the service would record it, cleared (expiring when the
      // clearance ends inside the warning window) with nothing against it when signed.
      const statusWhenSigned = until.getTime() <= addStudioDays(at, policy.warningDays, tz).getTime() ? 'expiring' : 'cleared';
      // Kept with the clearance: the point's own end, as the service works it out when the rigger signs.
      const kept = policyClearanceEnd(at, path, policy);
      const inspectionId = await inspect({ kind: 'periodic', point_id: b.point.id, gear_id: null, inspector_id: rigger, notes: latest ? (plan.notes ?? '') : '', cleared: true, cleared_until: until.toISOString(), clearance_end: kept.toISOString(), point_status: statusWhenSigned, point_reasons_json: '[]' }, at, items);
      for (const l of path) await renew(l.gear, at);
      await trx('points').where({ id: b.point.id }).update({ last_cleared_at: at.toISOString(), clearance_voided_at: null, updated_at: at.toISOString() });
      audit(at, { actorId: rigger, action: 'point.cleared', entity: 'point', entityId: b.point.id, after: { inspectionId, cleared: true, clearedUntil: until.toISOString(), keptUntil: kept.toISOString(), failed: [] } });
    }
  }

  // 2. Gear inspected on its own in the Gear Room.
  for (const plan of gearInspectionPlans) {
    const gear = plan.serial ? await gearBySerial(plan.serial) : gearOn(plan.pointLabel!, plan.kind);
    const at = ago(plan.daysAgo, plan.time);
    const inspectionId = await inspect({ kind: 'periodic', point_id: null, gear_id: gear.id, inspector_id: rigger, notes: plan.notes, cleared: false, cleared_until: null }, at, [], 'pass');
    await renew(gear, at);
    audit(at, { actorId: rigger, action: 'gear.inspected', entity: 'gear', entityId: gear.id, after: { inspectionId, kind: 'periodic', result: 'pass', note: plan.notes } });
  }

  // 3. Yesterday's pre-use checks, by the instructors of yesterday's classes.
  for (const cls of weeklyClasses.filter((c) => c.day === 6)) {
    const at = new Date(localTime(now, -1, slotClock(cls.time, now, tz), tz).getTime() - 20 * 60_000);
    const by = await userIdByEmail(trx, cls.instructor);
    for (const label of cls.points.filter((p) => !preuseSkipped.includes(p))) {
      const watch = preuseAttention[label];
      const items: Item[] = preuseChecklist(point(label).snapshot.links).map((i) => ({ ...i, gearId: null, result: watch?.key === i.key ? 'attention' : 'pass', note: watch?.key === i.key ? watch.note : '' }));
      const inspectionId = await inspect({ kind: 'pre_use', point_id: point(label).point.id, gear_id: null, inspector_id: by, notes: '', cleared: false, cleared_until: null }, at, items, 'pass');
      audit(at, { actorId: by, action: 'point.preuse_checked', entity: 'point', entityId: point(label).point.id, after: { inspectionId, failed: [] } });
    }
  }

  // 4. Faults, reported by the instructor. A fault voids the clearance of the point it hangs on,
  //    if that clearance came before it; a replacement swaps the stock item into the path.
  for (const plan of faultPlans) {
    const b = point(plan.pointLabel);
    const gear = plan.serial ? await gearBySerial(plan.serial) : gearOn(plan.pointLabel, plan.kind);
    const at = ago(plan.daysAgo, plan.time);
    const r = plan.resolved;
    const resolvedAt = r ? ago(r.daysAgo, r.time) : null;
    const [row] = await trx('faults')
      .insert({
        point_id: b.point.id,
        gear_id: gear.id,
        severity: plan.severity,
        description: plan.description,
        status: r ? 'resolved' : 'open',
        reported_by: instructor,
        reported_at: at.toISOString(),
        source_inspection_id: null,
        resolution: r?.resolution ?? null,
        resolution_note: r?.note ?? null,
        resolved_by: r ? rigger : null,
        resolved_at: resolvedAt?.toISOString() ?? null,
      })
      .returning('id');
    const faultId = (row as { id: number }).id;
    voids.push({ pointId: b.point.id, at, reason: 'fault_opened', source: `fault #${faultId}`, actorId: instructor });
    audit(at, { actorId: instructor, action: 'fault.opened', entity: 'fault', entityId: faultId, after: { pointId: b.point.id, gearId: gear.id, severity: plan.severity, description: plan.description } });
    if (!r || !resolvedAt) continue;
    const body: Record<string, unknown> = { resolution: r.resolution, note: r.note };
    if (r.replacementSerial && r.oldGearStatus) {
      // 02-rig already hangs the replacement in the path; the old item comes out with its status.
      Object.assign(body, { replacementGearId: (await gearBySerial(r.replacementSerial)).id, oldGearStatus: r.oldGearStatus });
      await trx('gear_items').where({ id: gear.id }).update({ status: r.oldGearStatus, status_reason: `Replaced after fault #${faultId}: ${r.note}`, updated_at: resolvedAt.toISOString() });
    }
    audit(resolvedAt, { actorId: rigger, action: 'fault.resolved', entity: 'fault', entityId: faultId, before: { status: 'open' }, after: body });
  }

  // 5. LS-5's delta link swapped for a carabiner since its last clearance: the change voids it.
  {
    const b = point(pathChange.pointLabel);
    const at = ago(pathChange.daysAgo, pathChange.time);
    const before = pathConfigOf({ structuralRatingKn: b.snapshot.structuralRatingKn, links: await pathAtClearance(pathChange.pointLabel) });
    voids.push({ pointId: b.point.id, at, reason: 'fixed_links_changed', source: 'load path saved', actorId: rigger });
    audit(at, { actorId: rigger, action: 'point.load_path_replaced', entity: 'point', entityId: b.point.id, before: before.links, after: pathConfigOf(b.snapshot).links });
  }

  // The voids in time order: each voids the point's latest clearance if it came before it, as the
  // services do (a void row, the record the status is derived from, and the point's cache columns).
  for (const v of voids.sort((a, b) => a.at.getTime() - b.at.getTime())) {
    const c = (await rig.clearanceStates([v.pointId], trx)).get(v.pointId);
    if (!c || c.voidedAt || Date.parse(c.at) >= v.at.getTime()) continue;
    await trx('clearance_voids').insert({ point_id: v.pointId, inspection_id: c.inspectionId, at: v.at.toISOString(), reason: v.reason, source: v.source });
    await trx('points').where({ id: v.pointId }).update({ clearance_voided_at: v.at.toISOString(), updated_at: v.at.toISOString() });
    audit(v.at, { actorId: v.actorId, action: 'point.clearance_voided', entity: 'point', entityId: v.pointId, after: { inspectionId: c.inspectionId, reason: v.reason, source: v.source } });
  }

  // 6. A mounted carabiner retired; a mounted hoop dropped and quarantined.
  const retired = gearOn(retirement.pointLabel, retirement.kind);
  const retiredAt = ago(retirement.daysAgo, retirement.time);
  await trx('gear_items').where({ id: retired.id }).update({ status: 'retired', status_reason: retirement.reason, updated_at: retiredAt.toISOString() });
  audit(retiredAt, { actorId: rigger, action: 'gear.retired', entity: 'gear', entityId: retired.id, before: { status: 'in_service' }, after: { status: 'retired', reason: retirement.reason } });
  const hoop = gearOn(drop.pointLabel, drop.kind);
  const dropAt = ago(drop.daysAgo, drop.time);
  await trx('gear_events').insert({ gear_id: hoop.id, kind: 'drop', note: drop.note, recorded_by: rigger, recorded_at: dropAt.toISOString() });
  await trx('gear_items').where({ id: hoop.id }).update({ status: 'quarantined', status_reason: 'After drop: awaiting an after-incident inspection', updated_at: dropAt.toISOString() });
  audit(dropAt, { actorId: rigger, action: 'gear.event_recorded', entity: 'gear', entityId: hoop.id, after: { kind: 'drop', note: drop.note } });

  const chain = auditRepository(trx, auditKey);
  for (const { at, entry } of audits.sort((a, b) => a.at.getTime() - b.at.getTime())) await chain.record(trx, entry, at);
}

/** The point's clearance end with every item in the path inspected at `at` (PRODUCT.md §4.1). */
function clearanceEnd(path: LinkSnapshot[], at: Date, policy: Policy): Date {
  const { fixed, apparatus } = splitPath(path);
  const days = Math.min(policy.intervalDays.structure, ...fixed.map((l) => intervalDaysOf(l.gear.kind, policy)));
  const own = addStudioDays(at, days, policy.timeZone);
  if (!apparatus) return own;
  const inspected = addStudioDays(at, intervalDaysOf(apparatus.gear.kind, policy), policy.timeZone);
  return inspected < own ? inspected : own;
}
