import type { Db } from '../db/knex';
import type { Policy } from '../../shared/schemas/policy';
import { loadApparatus, loadSnapshots, type ApparatusBundle, type SnapshotBundle } from '../modules/rig/point-snapshots';
import { rigRepository, type RigRepository } from '../modules/rig/rig.repository';
import { outboxRepository, type OutboxRepository } from '../modules/outbox/outbox.repository';
import { mailDataRepository, type MailDataRepository, type MailSession } from './mail-data.repository';
import { hangingOf, loadRecorded, type BookedClass, type HungPoint } from '../modules/sessions/session-rig';

/** What one worker cycle reads: the instant it runs for, the studio as it is now, and its stores. */
export interface MailCycleContext {
  db: Db;
  now: Date;
  studioName: string;
  policy: Policy;
  appUrl: string;
  outbox: OutboxRepository;
  data: MailDataRepository;
  rig: RigRepository;
  /** Every point's snapshot, loaded once per cycle on first use. */
  snapshots(): Promise<Map<number, SnapshotBundle>>;
  /** A session's points as they hang for its class (PRODUCT.md §4.7), read afresh (or as `preloadHanging` read them this cycle). */
  hanging(s: MailSession, pointIds: number[]): Promise<HungPoint[]>;
  /** Reads what `hanging` needs for many sessions in a few queries (the at-risk scan), so it asks nothing per session. */
  preloadHanging(sessionIds: number[]): Promise<void>;
}

/** Ids per `whereIn`, well under either database's limit on bound values. */
const IDS_PER_QUERY = 500;

export function cycleContext(db: Db, now: Date, studio: { name: string; policy: Policy }, appUrl: string): MailCycleContext {
  const rig = rigRepository(db);
  let cached: Promise<Map<number, SnapshotBundle>> | null = null;
  const recordedBySession = new Map<number, Array<{ pointId: number; gearId: number }>>();
  const items = new Map<number, ApparatusBundle>();
  return {
    db,
    now,
    studioName: studio.name,
    policy: studio.policy,
    appUrl,
    outbox: outboxRepository(db),
    data: mailDataRepository(db),
    rig,
    snapshots: () => (cached ??= loadSnapshots(db, rig).then((list) => new Map(list.map((b) => [b.point.id, b])))),
    async hanging(s, pointIds) {
      const bundles = await this.snapshots();
      const recordedApparatus = recordedBySession.get(s.id) ?? (await this.data.recordedApparatusOf([s.id])).get(s.id) ?? [];
      const cls: BookedClass = { ...s, pointIds, recordedApparatus };
      const preloaded = recordedApparatus.every((a) => items.has(a.gearId));
      const recorded = preloaded ? new Map(recordedApparatus.map((a) => [a.gearId, items.get(a.gearId)!])) : await loadRecorded(rig, [cls], db);
      return hangingOf(cls, bundles, recorded);
    },
    async preloadHanging(sessionIds) {
      for (let i = 0; i < sessionIds.length; i += IDS_PER_QUERY) {
        for (const [id, list] of await this.data.recordedApparatusOf(sessionIds.slice(i, i + IDS_PER_QUERY))) recordedBySession.set(id, list);
      }
      const gearIds = [...new Set([...recordedBySession.values()].flatMap((list) => list.map((a) => a.gearId)))].filter((id) => !items.has(id));
      for (let i = 0; i < gearIds.length; i += IDS_PER_QUERY) {
        for (const [id, item] of await loadApparatus(rig, { ids: gearIds.slice(i, i + IDS_PER_QUERY) }, db)) items.set(id, item);
      }
    },
  };
}
