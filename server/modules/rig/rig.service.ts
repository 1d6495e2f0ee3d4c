import { takenMessage } from '../../../shared/text/labels';
import { writeTransaction, type Db } from '../../db/knex';
import type { Clock } from '../../clock';
import { conflict, HttpError, notFound } from '../../http/errors';
import type { AuditRepository } from '../audit/audit.repository';
import type { StudioRepository } from '../studio/studio.repository';
import { impossibleGearFacts, type CreateGear, type CreatePoint, type GearEventBody, type GearListQuery, type LoadPathBody, type UpdateGear, type UpdatePoint } from '../../../shared/schemas/rig';
import { apparatusUnfitReasons, pointStatusAt, serviceLifeEnd, splitPath, studioDay, voidsClearance, gearRatingChangeVoids, pathConfigOf, type PathConfig, type PointStatus } from '../../../shared/clearance';
import { checkLoadPath, describeGear, type LoadProfile } from '../../../shared/rigging';
import { isApparatusKind } from '../../../shared/schemas/vocabulary';
import { requiredFactorReasonOf, type Policy } from '../../../shared/schemas/policy';
import type { GearRecord, RigRepository } from './rig.repository';
import { freshSnapshots, loadApparatus, type SnapshotBundle, type SnapshotSource } from './point-snapshots';
import { voidClearance } from './clearance-voids';
import { deriveAt, noDerivedCache, type DerivedCache } from '../../db/derived-cache';
import { unboundedWork, type HeavyWork } from '../../http/heavy-work';

export const statusWire = (s: PointStatus) => ({ status: s.status, clearedUntil: s.clearedUntil?.toISOString() ?? null, reasons: s.reasons.map((r) => ({ code: r.code, message: r.message })) });

export interface ClassProfileSource {
  profileOf(classTypeId: number, policy: Policy): Promise<LoadProfile & { name: string }>;
}

export function rigService(deps: { db: Db; rig: RigRepository; audit: AuditRepository; studio: StudioRepository; clock: Clock; classProfiles: ClassProfileSource; derived?: DerivedCache; heavy?: HeavyWork; snapshots?: SnapshotSource }) {
  const { db, rig, audit, studio, clock } = deps;
  const derived = deps.derived ?? noDerivedCache;
  const heavy = deps.heavy ?? unboundedWork;
  const snapshots = deps.snapshots ?? freshSnapshots(db, rig);

  const gearWire = (g: GearRecord, timeZone: string) => ({ ...g, serviceLifeEndsOn: serviceLifeEnd(g, timeZone)?.toISOString() ?? null });

  function pointWire(b: SnapshotBundle, policy: Policy, at: Date, withLinks: boolean) {
    return {
      ...b.point,
      status: statusWire(pointStatusAt(b.snapshot, policy, at)),
      ...(withLinks
        ? { links: b.links.map((l) => ({ position: l.position, gearId: l.gearId, mode: l.mode, threeWay: l.threeWay, basketOverHalf: l.basketOverHalf, leg: l.leg, includedAngleDeg: l.includedAngleDeg, gear: gearWire(l.gear, policy.timeZone) })) }
        : {}),
    };
  }

  async function bundle(id: number, trx: Db = db): Promise<SnapshotBundle> {
    const [b] = await snapshots.load({ ids: [id] }, trx);
    if (!b) throw notFound('That rigging point');
    return b;
  }

  async function gearOrThrow(id: number, trx: Db = db) {
    const g = await rig.gearById(id, trx);
    if (!g) throw notFound('That gear item');
    return g;
  }

  /** 400 with a message next to each field when the gear data cannot be true (today is the studio's day). */
  async function refuseImpossibleFacts(g: Parameters<typeof impossibleGearFacts>[0]) {
    const { policy } = await studio.get();
    const fields = impossibleGearFacts(g, studioDay(clock.now(), policy.timeZone));
    const messages = Object.values(fields);
    if (messages.length) throw new HttpError(400, 'invalid_request', `${messages.join('. ')}.`, { source: 'body', fields });
  }

  return {
    // ---- rooms
    listRooms: () => rig.listRooms(),
    async getRoom(id: number) {
      const room = await rig.roomById(id);
      if (!room) throw notFound('That room');
      const { policy } = await studio.get();
      const now = clock.now();
      const points = (await snapshots.load({ roomId: id })).map((b) => pointWire(b, policy, now, false));
      return { ...room, points };
    },
    async createRoom(name: string, actorId: number) {
      const takenBy = await rig.roomNameTaken(name);
      if (takenBy) throw conflict('room_exists', takenMessage('Room', name, takenBy), { fields: { name: takenBy === name ? 'Already used' : `Looks the same as “${takenBy}”` }, existing: takenBy });
      return writeTransaction(db, async (trx) => {
        const room = await rig.insertRoom(name, clock.now(), trx);
        await audit.record(trx, { actorId, action: 'room.created', entity: 'room', entityId: room.id, after: room }, clock.now());
        return { ...room, pointCount: 0 };
      });
    },

    // ---- points
    listPoints(filter: { roomId?: number }) {
      return derived.get(`points|${filter.roomId ?? ''}`, () =>
        heavy.run(async () => {
          const { policy } = await studio.get();
          const bundles = await snapshots.load(filter);
          return deriveAt(policy, clock.now(), (track) =>
            bundles.map((b) => {
              track.snapshot(b.snapshot);
              return pointWire(b, policy, track.now, false);
            }),
          );
        }),
      );
    },
    async getPoint(id: number) {
      const { policy } = await studio.get();
      return pointWire(await bundle(id), policy, clock.now(), true);
    },
    /**
     * The point's status now or at a future instant. A past instant is refused (PRODUCT.md §10):
     * today's records cannot say how the point stood then, and the kept records say it only for
     * the instants classes started; the point's history holds those.
     */
    async pointStatus(id: number, at: Date | null) {
      const { policy } = await studio.get();
      const now = clock.now();
      const b = await bundle(id);
      if (at && at.getTime() < now.getTime()) {
        throw new HttpError(400, 'past_instant', `Status at a past instant is not worked out from today's records. See the history of point ${b.point.label}: each class keeps its points' status as it started.`, {
          source: 'query',
          fields: { at: 'Pick now or a later instant' },
          pointId: id,
          history: `/api/points/${id}/records`,
          page: `/rig/points/${id}`,
        });
      }
      return statusWire(pointStatusAt(b.snapshot, policy, at ?? now));
    },
    async createPoint(input: CreatePoint, actorId: number) {
      if (!(await rig.roomById(input.roomId))) throw new HttpError(400, 'invalid_request', 'That room does not exist.', { source: 'body', fields: { roomId: 'Pick an existing room' } });
      const takenBy = await rig.pointLabelTaken(input.label);
      if (takenBy) throw conflict('label_taken', takenMessage('Point', input.label, takenBy), { fields: { label: takenBy === input.label ? 'Already used' : `Looks the same as “${takenBy}”` }, existing: takenBy });
      const id = await writeTransaction(db, async (trx) => {
        const newId = await rig.insertPoint(input, clock.now(), trx);
        await audit.record(trx, { actorId, action: 'point.created', entity: 'point', entityId: newId, after: input }, clock.now());
        return newId;
      });
      return this.getPoint(id);
    },
    async updatePoint(id: number, patch: UpdatePoint, actorId: number) {
      const before = (await bundle(id)).point;
      if (patch.roomId !== undefined && !(await rig.roomById(patch.roomId))) throw new HttpError(400, 'invalid_request', 'That room does not exist.', { source: 'body', fields: { roomId: 'Pick an existing room' } });
      const takenBy = patch.label !== undefined ? await rig.pointLabelTaken(patch.label, id) : null;
      if (takenBy) throw conflict('label_taken', takenMessage('Point', patch.label!, takenBy), { fields: { label: takenBy === patch.label ? 'Already used' : `Looks the same as “${takenBy}”` }, existing: takenBy });
      await writeTransaction(db, async (trx) => {
        const now = clock.now();
        await rig.updatePoint(id, patch, now, trx);
        // A new structural rating changes what the clearance vouched for.
        if (patch.structuralRatingKn !== undefined && patch.structuralRatingKn !== before.structuralRatingKn) {
          await voidClearance(trx, { rig, audit }, { pointId: id, at: now, actorId, why: { reason: 'structural_rating_changed', source: `structural rating ${before.structuralRatingKn} kN → ${patch.structuralRatingKn} kN` } });
        }
        await audit.record(trx, { actorId, action: 'point.updated', entity: 'point', entityId: id, before, after: patch }, now);
      });
      return this.getPoint(id);
    },

    /** Replaces the whole path in one transaction; a refusal leaves the old path as it was. */
    async replaceLoadPath(id: number, body: LoadPathBody, actorId: number) {
      const result = await writeTransaction(db, async (trx) => {
        const current = await bundle(id, trx);
        const gearIds = body.links.map((l) => l.gearId);
        const gear = new Map((await rig.gearByIds(gearIds, trx)).map((g) => [g.id, g]));
        const missing = gearIds.filter((g) => !gear.has(g));
        if (missing.length) throw new HttpError(400, 'unknown_gear', `No gear item with id ${missing.join(', ')}.`, { gearIds: missing });
        const inUse = gearIds.filter((g) => gear.get(g)!.pointId !== null && gear.get(g)!.pointId !== id);
        if (inUse.length) {
          const names = inUse.map((g) => `${gear.get(g)!.serial} (on ${gear.get(g)!.pointLabel})`).join(', ');
          throw conflict('gear_in_use', `Already hanging in another load path: ${names}. Take it out there first.`, { gearIds: inUse });
        }
        const retired = gearIds.filter((g) => gear.get(g)!.status === 'retired');
        if (retired.length) throw conflict('gear_retired', `Retired gear cannot be mounted: ${retired.map((g) => gear.get(g)!.serial).join(', ')}.`, { gearIds: retired });

        const before = pathConfigOf(current.snapshot);
        const after: PathConfig = {
          structuralRatingKn: current.point.structuralRatingKn,
          links: body.links.map((l, i) => {
            const g = gear.get(l.gearId)!;
            return {
              gearId: g.id,
              mode: l.mode,
              threeWay: l.threeWay,
              basketOverHalf: l.basketOverHalf,
              leg: l.leg ?? null,
              includedAngleDeg: l.leg ? (l.includedAngleDeg ?? null) : null,
              majorKn: g.majorKn,
              minorKn: g.minorKn,
              gateOpenKn: g.gateOpenKn,
              wllKn: g.wllKn,
              multiDirectional: g.multiDirectional,
              isApparatus: i === body.links.length - 1 && isApparatusKind(g.kind),
            };
          }),
        };
        const identical = JSON.stringify(before.links.map(strip)) === JSON.stringify(after.links.map(strip));
        if (identical) return { voided: false, changed: false };
        const now = clock.now();
        const voided = voidsClearance(before, after) && current.point.lastClearedAt !== null && current.point.clearanceVoidedAt === null;
        await rig.replaceLinks(id, body.links.map((l) => ({ ...l, includedAngleDeg: l.leg ? l.includedAngleDeg : null })), trx);
        if (voidsClearance(before, after)) await voidClearance(trx, { rig, audit }, { pointId: id, at: now, actorId, why: { reason: 'fixed_links_changed', source: 'load path saved' } });
        await audit.record(trx, { actorId, action: 'point.load_path_replaced', entity: 'point', entityId: id, before: before.links, after: after.links }, now);
        return { voided, changed: true };
      });
      return { ...(await this.getPoint(id)), ...result };
    },

    /**
     * PRODUCT.md §4.7: mounts a fit apparatus of a kind the point allows, swapping only the
     * apparatus link (the one there goes back to the gear room). Voids nothing (§4.1): the
     * apparatus carries its own inspection. An item hanging on another point moves from there,
     * unless a class is under way on it; nor is the apparatus of a point with a class under way changed.
     */
    async mountApparatus(id: number, gearId: number, actorId: number) {
      const { policy } = await studio.get();
      const result = await writeTransaction(db, async (trx) => {
        const now = clock.now();
        const b = await bundle(id, trx);
        const g = await rig.gearById(gearId, trx);
        if (!g) throw new HttpError(400, 'unknown_gear', 'There is no gear item with that id.', { source: 'body', fields: { gearId: 'Pick an apparatus from the register' } });
        const name = describeGear(g);
        if (!isApparatusKind(g.kind)) throw new HttpError(400, 'not_apparatus', `${name} is not an apparatus: only a fabric, hoop, trapeze, hammock, straps or rope is mounted this way.`, { source: 'body', fields: { gearId: 'Pick an apparatus' } });
        const { fixed, apparatus } = splitPath(b.snapshot.links);
        if (apparatus?.gear.id === gearId) return { changed: false, movedFrom: null };
        if (!fixed.length) throw conflict('no_load_path', `Point ${b.point.label} has no fixed rigging to hang ${name} from.`);
        if (!b.point.apparatus.includes(g.kind)) {
          throw conflict('apparatus_not_allowed', `Point ${b.point.label} does not allow ${g.kind} (allowed: ${b.point.apparatus.join(', ') || 'none'}).`, { fields: { gearId: `Not allowed on ${b.point.label}` } });
        }
        const item = (await loadApparatus(rig, { ids: [gearId] }, trx)).get(gearId)!;
        const unfit = apparatusUnfitReasons(item.gear, item.openFaults, policy, now, now);
        if (unfit.length) throw conflict('apparatus_unfit', `${name} cannot be mounted: ${unfit.map((r) => r.message.replace(/^The /, 'the ')).join('; ')}.`, { reasons: unfit, fields: { gearId: 'Not fit to hang' } });
        // Someone may be hanging on the apparatus there now: no changeover under a class under way.
        if (apparatus && (await rig.classUnderWayOn(id, now, trx))) {
          throw conflict('apparatus_in_use', `A class is under way on ${b.point.label}: change ${describeGear(apparatus.gear)} for ${name} after that class.`);
        }
        let movedFrom: string | null = null;
        if (g.pointId !== null && g.pointId !== id) {
          const other = await bundle(g.pointId, trx);
          if (splitPath(other.snapshot.links).apparatus?.gear.id !== gearId) throw conflict('gear_in_use', `${name} is part of the fixed rigging of ${other.point.label}.`);
          if (await rig.classUnderWayOn(g.pointId, now, trx)) throw conflict('apparatus_in_use', `${name} hangs on ${other.point.label} for a class under way: take it down after that class.`);
          await rig.removeLink(gearId, trx);
          movedFrom = other.point.label;
          await audit.record(trx, { actorId, action: 'point.apparatus_removed', entity: 'point', entityId: other.point.id, before: { gearId, serial: g.serial }, after: { gearId: null, movedTo: b.point.label } }, now);
        }
        await rig.setApparatusLink(id, apparatus?.gear.id ?? null, gearId, trx);
        await audit.record(
          trx,
          { actorId, action: 'point.apparatus_mounted', entity: 'point', entityId: id, before: { gearId: apparatus?.gear.id ?? null, serial: apparatus?.gear.serial ?? null }, after: { gearId, serial: g.serial, movedFrom } },
          now,
        );
        return { changed: true, movedFrom };
      });
      return { ...(await this.getPoint(id)), ...result };
    },

    async loadCheck(id: number, q: { classTypeId?: number; performers?: number; bodyMassKg?: number; dynamicFactor?: number }) {
      const { policy } = await studio.get();
      const b = await bundle(id);
      let profile: LoadProfile & { name?: string };
      if (q.classTypeId !== undefined) profile = await deps.classProfiles.profileOf(q.classTypeId, policy);
      else profile = { performers: q.performers!, bodyMassKg: q.bodyMassKg ?? policy.bodyMassKg, dynamicFactor: q.dynamicFactor! };
      const result = checkLoadPath({ links: b.snapshot.links, structuralRatingKn: b.point.structuralRatingKn, profile, requiredFactor: policy.requiredFactor, requiredFactorReason: requiredFactorReasonOf(policy), displayUnit: policy.units });
      return { ...result, profile: { performers: profile.performers, bodyMassKg: profile.bodyMassKg, dynamicFactor: profile.dynamicFactor } };
    },

    // ---- gear
    async listGear(f: GearListQuery) {
      const { policy } = await studio.get();
      const now = clock.now();
      let rows = (await rig.listGear(f, now)).map((g) => gearWire(g, policy.timeZone));
      if (f.lifeEndingDays !== undefined) {
        const by = now.getTime() + f.lifeEndingDays * 86_400_000;
        rows = rows.filter((g) => g.serviceLifeEndsOn !== null && new Date(g.serviceLifeEndsOn).getTime() <= by);
      }
      return rows;
    },
    async getGear(id: number) {
      const { policy } = await studio.get();
      return { ...gearWire(await gearOrThrow(id), policy.timeZone), events: await rig.gearEvents(id) };
    },
    async createGear(input: CreateGear, actorId: number) {
      await refuseImpossibleFacts(input);
      const takenBy = await rig.serialTaken(input.serial);
      if (takenBy) throw conflict('serial_taken', takenMessage('Gear serial', input.serial, takenBy), { fields: { serial: takenBy === input.serial ? 'Already used' : `Looks the same as “${takenBy}”` }, existing: takenBy });
      const id = await writeTransaction(db, async (trx) => {
        const newId = await rig.insertGear(input, clock.now(), trx);
        await audit.record(trx, { actorId, action: 'gear.created', entity: 'gear', entityId: newId, after: input }, clock.now());
        return newId;
      });
      return this.getGear(id);
    },
    async updateGear(id: number, patch: UpdateGear, actorId: number) {
      const before = await gearOrThrow(id);
      const takenBy = patch.serial !== undefined ? await rig.serialTaken(patch.serial, id) : null;
      if (takenBy) throw conflict('serial_taken', takenMessage('Gear serial', patch.serial!, takenBy), { fields: { serial: takenBy === patch.serial ? 'Already used' : `Looks the same as “${takenBy}”` }, existing: takenBy });
      const after = { ...before, ...patch } as GearRecord;
      // The edit may be consistent on its own yet not with what is stored (a service date before the stored manufacture).
      await refuseImpossibleFacts(after);
      if (before.pointId !== null && patch.kind !== undefined && isApparatusKind(patch.kind) !== isApparatusKind(before.kind)) {
        throw conflict('gear_in_use', 'Take the item out of its load path before changing it between apparatus and fixed gear.');
      }
      await writeTransaction(db, async (trx) => {
        const now = clock.now();
        await rig.updateGear(id, patch, now, trx);
        if (before.pointId !== null && gearRatingChangeVoids(before, after)) {
          await voidClearance(trx, { rig, audit }, { pointId: before.pointId, at: now, actorId, why: { reason: 'gear_ratings_changed', source: `ratings of ${before.serial} edited` } });
        }
        await audit.record(trx, { actorId, action: 'gear.updated', entity: 'gear', entityId: id, before, after: patch }, now);
      });
      return this.getGear(id);
    },
    async setGearStatus(id: number, status: 'retired' | 'quarantined', reason: string, actorId: number) {
      const before = await gearOrThrow(id);
      if (before.status === 'retired') throw conflict('gear_retired', 'This item is already retired; a retirement is final.');
      await writeTransaction(db, async (trx) => {
        await rig.updateGear(id, { status, statusReason: reason }, clock.now(), trx);
        await audit.record(trx, { actorId, action: `gear.${status}`, entity: 'gear', entityId: id, before: { status: before.status }, after: { status, reason } }, clock.now());
      });
      return this.getGear(id);
    },
    /** An event quarantines the item until an after-incident inspection passes; it opens no fault and voids no clearance. */
    async recordEvent(id: number, e: GearEventBody, actorId: number) {
      const before = await gearOrThrow(id);
      const eventId = await writeTransaction(db, async (trx) => {
        const now = clock.now();
        const newId = await rig.insertGearEvent({ gearId: id, kind: e.kind, note: e.note, by: actorId }, now, trx);
        if (before.status !== 'retired') await rig.updateGear(id, { status: 'quarantined', statusReason: `After ${e.kind.replace(/_/g, ' ')}: awaiting an after-incident inspection` }, now, trx);
        await audit.record(trx, { actorId, action: 'gear.event_recorded', entity: 'gear', entityId: id, after: e }, now);
        return newId;
      });
      const events = await rig.gearEvents(id);
      return events.find((x) => x.id === eventId)!;
    },
  };
}
export type RigService = ReturnType<typeof rigService>;

// Ratings included: a swapped gear item with other ratings is a change even in the same position.
const strip = (l: PathConfig['links'][number]) => [l.gearId, l.mode, l.threeWay, l.basketOverHalf, l.leg ?? null, l.leg ? (l.includedAngleDeg ?? null) : null];
