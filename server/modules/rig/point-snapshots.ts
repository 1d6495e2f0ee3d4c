import type { Db } from '../../db/knex';
import type { DataVersion } from '../../db/data-version';
import { keptPerVersion } from '../../db/kept-reads';
import { freezeSnapshot, type OpenFault, type PointSnapshot, type GearSnapshot, type RecordedApparatus } from '../../../shared/clearance';
import { freezeDeep } from '../../../shared/freeze';
import type { GearRecord, LinkRecord, PointRecord, RigRepository } from './rig.repository';

const toDate = (s: string | null) => (s ? new Date(s) : null);

export function gearSnapshot(g: GearRecord): GearSnapshot {
  return {
    id: g.id,
    kind: g.kind,
    material: g.material,
    gate: g.gate,
    serial: g.serial,
    majorKn: g.majorKn,
    minorKn: g.minorKn,
    gateOpenKn: g.gateOpenKn,
    wllKn: g.wllKn,
    multiDirectional: g.multiDirectional,
    status: g.status,
    manufacturedOn: g.manufacturedOn,
    inServiceOn: g.inServiceOn,
    serviceLifeYears: g.serviceLifeYears,
    inspectedUntil: toDate(g.inspectedUntil),
  };
}

export interface SnapshotBundle {
  point: PointRecord;
  links: Array<LinkRecord & { gear: GearRecord }>;
  snapshot: PointSnapshot;
}

/**
 * Everything the status rules need for a set of points, in four queries whatever the number of
 * points: the points, their links with the gear in them, their clearances (from the inspection and
 * void rows), and the open faults on either.
 */
export async function loadSnapshots(db: Db, rig: RigRepository, filter: { ids?: number[]; roomId?: number } = {}, trx: Db = db): Promise<SnapshotBundle[]> {
  const points = await rig.listPoints(filter, trx);
  if (!points.length) return [];
  const pointIds = points.map((p) => p.id);
  const links = await rig.linksWithGear(filter.ids || filter.roomId ? pointIds : 'all', trx);
  // The clearance from the append-only rows (cleared inspections, voids), never from the point's
  // cache columns, which a hand edit could change (PRODUCT.md §10; the audit check compares them).
  const clearances = await rig.clearanceStates(filter.ids || filter.roomId ? pointIds : 'all', trx);
  const gearIds = [...new Set(links.map((l) => l.gearId))];
  const faults = (await trx('faults')
    .where('status', 'open')
    .where((w) => {
      w.whereIn('point_id', pointIds);
      if (gearIds.length) w.orWhereIn('gear_id', gearIds);
    })
    .select('id', 'point_id', 'gear_id', 'severity', 'description')) as Array<{ id: number; point_id: number | null; gear_id: number | null; severity: OpenFault['severity']; description: string }>;

  const linksByPoint = new Map<number, Array<LinkRecord & { gear: GearRecord }>>();
  for (const l of links) {
    const list = linksByPoint.get(l.pointId) ?? [];
    list.push(l);
    linksByPoint.set(l.pointId, list);
  }
  return points.map((stored) => {
    const c = clearances.get(stored.id);
    const p: PointRecord = { ...stored, lastClearedAt: c?.at ?? null, clearanceVoidedAt: c?.voidedAt ?? null };
    const pl = linksByPoint.get(p.id) ?? [];
    const inPath = new Set(pl.map((l) => l.gearId));
    const openFaults: OpenFault[] = faults
      .filter((f) => f.point_id === p.id || (f.gear_id !== null && inPath.has(f.gear_id)))
      .map((f) => ({ id: f.id, pointId: f.point_id, gearId: f.gear_id, severity: f.severity, description: f.description }));
    // Sealed: the status rules may then remember what they found for it (shared/clearance/status.ts).
    const snapshot: PointSnapshot = freezeSnapshot({
      id: p.id,
      label: p.label,
      structure: p.structure,
      structuralRatingKn: p.structuralRatingKn,
      inService: p.inService,
      apparatus: p.apparatus,
      maxPerformers: p.maxPerformers,
      links: pl.map((l) => ({
        gear: gearSnapshot(l.gear),
        mode: l.mode,
        threeWay: l.threeWay,
        basketOverHalf: l.basketOverHalf,
        leg: l.leg,
        includedAngleDeg: l.includedAngleDeg,
      })),
      lastClearance: c ? { at: new Date(c.at), voidedAt: toDate(c.voidedAt), until: toDate(c.until) } : null,
      openFaults,
    });
    return { point: p, links: pl, snapshot };
  });
}

export interface ApparatusBundle extends RecordedApparatus {
  record: GearRecord;
}

/**
 * Apparatus items by id, each as the rules see it with the open faults on it (two queries), for
 * the classes they are recorded for or could be (PRODUCT.md §4.7). Sealed like point snapshots.
 */
export async function loadApparatus(rig: RigRepository, by: { ids: number[] } | { kind: string; unmounted: true }, trx: Db): Promise<Map<number, ApparatusBundle>> {
  const records = 'ids' in by ? await rig.gearByIds([...new Set(by.ids)], trx) : (await rig.gearByIds(await rig.unmountedOfKind(by.kind, trx), trx));
  if (!records.length) return new Map();
  const faults = (await trx('faults')
    .where('status', 'open')
    .whereIn('gear_id', records.map((g) => g.id))
    .select('id', 'point_id', 'gear_id', 'severity', 'description')) as Array<{ id: number; point_id: number | null; gear_id: number | null; severity: OpenFault['severity']; description: string }>;
  return new Map(
    records.map((g) => {
      const gear = freezeDeep(gearSnapshot(g));
      const openFaults = freezeDeep(faults.filter((f) => f.gear_id === g.id).map((f) => ({ id: f.id, pointId: f.point_id, gearId: f.gear_id, severity: f.severity, description: f.description })));
      return [g.id, { record: g, gear, openFaults }];
    }),
  );
}

/** Where services read snapshots from: `loadSnapshots`, or the rig kept per data version. */
export interface SnapshotSource {
  /** The points matching `filter` (every point by default), in room and label order, as `loadSnapshots` answers. */
  load(filter?: { ids?: number[]; roomId?: number }, trx?: Db): Promise<SnapshotBundle[]>;
}

/**
 * Every point's snapshot read once per data version (server/db/kept-reads.ts) and filtered in
 * memory; inside a transaction, or with no version (kept reads off), loaded afresh as asked.
 */
export function snapshotSource(db: Db, rig: RigRepository, version: DataVersion | null): SnapshotSource {
  const all = keptPerVersion(db, version, (trx) => loadSnapshots(db, rig, {}, trx));
  return {
    async load(filter = {}, trx = db) {
      if (!version || trx !== db) return loadSnapshots(db, rig, filter, trx);
      const bundles = await all.get();
      if (filter.ids) {
        const wanted = new Set(filter.ids);
        return bundles.filter((b) => wanted.has(b.point.id));
      }
      if (filter.roomId) return bundles.filter((b) => b.point.roomId === filter.roomId);
      return bundles.slice();
    },
  };
}

/** Snapshots loaded afresh on every call (tests and tools that build services by hand). */
export const freshSnapshots = (db: Db, rig: RigRepository): SnapshotSource => snapshotSource(db, rig, null);
