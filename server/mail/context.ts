import type { Db } from '../db/knex';
import type { Policy } from '../../shared/schemas/policy';
import { loadSnapshots, type SnapshotBundle } from '../modules/rig/point-snapshots';
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
  /** A session's points as they hang for its class (PRODUCT.md §4.7), read afresh. */
  hanging(s: MailSession, pointIds: number[]): Promise<HungPoint[]>;
}

export function cycleContext(db: Db, now: Date, studio: { name: string; policy: Policy }, appUrl: string): MailCycleContext {
  const rig = rigRepository(db);
  let cached: Promise<Map<number, SnapshotBundle>> | null = null;
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
      const recordedApparatus = (await this.data.recordedApparatusOf([s.id])).get(s.id) ?? [];
      const cls: BookedClass = { ...s, pointIds, recordedApparatus };
      return hangingOf(cls, bundles, await loadRecorded(rig, [cls], db));
    },
  };
}
