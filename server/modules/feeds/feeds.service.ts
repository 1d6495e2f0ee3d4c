import { createHash, randomBytes } from 'node:crypto';
import ical, { ICalEventStatus } from 'ical-generator';
import { writeTransaction, type Db } from '../../db/knex';
import type { Clock } from '../../clock';
import type { StudioRepository } from '../studio/studio.repository';
import type { StaffRepository } from '../staff/staff.repository';
import type { SessionsService } from '../sessions/sessions.service';
import type { CurrentUser } from '../../http/auth';
import { HttpError } from '../../http/errors';
import { feedsRepository, type FeedOwner } from './feeds.repository';
import type { FeedState, NewFeed } from '../../../shared/schemas/my';

/** What a feed lists ([studio choice]): the last week and the next five weeks. */
export const FEED_WINDOW = { pastDays: 7, aheadDays: 35 } as const;
const DAY = 86_400_000;

export const feedTokenHash = (token: string) => createHash('sha256').update(token).digest('hex');

export interface FeedsDeps {
  db: Db;
  clock: Clock;
  appUrl: string;
  studio: StudioRepository;
  /** Accounts: an instructor's, and the student record a student's account is linked to. */
  accounts: Pick<StaffRepository, 'byId' | 'studentIdOfAccount'>;
  sessions: Pick<SessionsService, 'list'>;
}

/**
 * Private iCalendar feeds (PRODUCT.md §11): `/ical/<token>.ics`, one per instructor (their classes
 * with room, points and changeovers) and per student (their bookings). Only a hash of the token is
 * kept, so the URL is shown once, when made; renewing revokes the old URL, and a revoked one is 404.
 */
export function feedsService(deps: FeedsDeps) {
  const { db, clock, appUrl } = deps;
  const repo = feedsRepository(db);

  async function ownerOf(user: CurrentUser): Promise<FeedOwner> {
    if (user.role === 'instructor') return { userId: user.id };
    if (user.role === 'student') {
      const studentId = await deps.accounts.studentIdOfAccount(user.id);
      if (!studentId) throw new HttpError(404, 'not_found', 'Your account is not linked to a student record.');
      return { studentId };
    }
    throw new HttpError(403, 'forbidden', 'Calendar feeds are for instructors and students.');
  }

  async function instructorCalendar(userId: number, name: string): Promise<string> {
    const { name: studioName, policy } = await deps.studio.get();
    const now = clock.now();
    const from = new Date(now.getTime() - FEED_WINDOW.pastDays * DAY);
    const to = new Date(now.getTime() + FEED_WINDOW.aheadDays * DAY);
    const sessions = await deps.sessions.list({ from: from.toISOString(), to: to.toISOString(), instructorId: userId });
    const cal = ical({ name: `${studioName}: ${name}'s classes`, timezone: policy.timeZone, prodId: { company: 'Loftwise', product: 'class-feed', language: 'EN' }, ttl: 15 * 60 });
    for (const s of sessions) {
      const points = s.points.map((p) => `${p.label} (${p.status})`).join(', ');
      const lines = [
        `Room: ${s.roomName}`,
        `Points: ${points || 'none'}`,
        ...(s.changeovers.length ? ['Changeovers:', ...s.changeovers.map((c) => `- ${c.message}`)] : []),
        ...(s.cancelled ? [`Cancelled${s.cancelReason ? `: ${s.cancelReason}` : ''}`] : []),
        '',
        'Point statuses are as of when your calendar last fetched this feed; check Today in Loftwise before class.',
      ];
      cal.createEvent({
        id: `session-${s.id}@loftwise`,
        start: new Date(s.startsAt),
        end: new Date(s.endsAt),
        summary: `${s.cancelled ? 'Cancelled: ' : ''}${s.className}`,
        location: s.roomName,
        description: lines.join('\n'),
        status: s.cancelled ? ICalEventStatus.CANCELLED : ICalEventStatus.CONFIRMED,
        url: `${appUrl}/today`,
        stamp: now,
      });
    }
    return cal.toString();
  }

  async function studentCalendar(studentId: number): Promise<string> {
    const { name: studioName, policy } = await deps.studio.get();
    const now = clock.now();
    const from = new Date(now.getTime() - FEED_WINDOW.pastDays * DAY).toISOString();
    const to = new Date(now.getTime() + FEED_WINDOW.aheadDays * DAY).toISOString();
    const rows = await repo.studentPlacesBetween(studentId, from, to);
    const cal = ical({ name: `${studioName}: my classes`, timezone: policy.timeZone, prodId: { company: 'Loftwise', product: 'class-feed', language: 'EN' }, ttl: 15 * 60 });
    for (const r of rows) {
      const cancelled = r.cancelled;
      const waitlisted = r.status === 'waitlisted';
      cal.createEvent({
        id: `place-${r.placeId}@loftwise`,
        start: new Date(r.startsAt),
        end: new Date(r.endsAt),
        summary: `${cancelled ? 'Cancelled: ' : waitlisted ? 'Waitlist: ' : ''}${r.className}`,
        location: r.roomName,
        description: [`Room: ${r.roomName}`, waitlisted ? 'You are on the waitlist: you will get an e-mail if a place frees up.' : r.pointLabel ? `Your point: ${r.pointLabel}` : ''].filter(Boolean).join('\n'),
        status: cancelled ? ICalEventStatus.CANCELLED : waitlisted ? ICalEventStatus.TENTATIVE : ICalEventStatus.CONFIRMED,
        url: `${appUrl}/my/bookings`,
        stamp: now,
      });
    }
    return cal.toString();
  }

  return {
    async state(user: CurrentUser): Promise<FeedState> {
      const feed = await repo.active(await ownerOf(user));
      return { active: Boolean(feed), createdAt: feed?.createdAt ?? null };
    },
    /** A new private URL; any earlier one stops working at once. */
    async renew(user: CurrentUser): Promise<NewFeed> {
      const owner = await ownerOf(user);
      const token = randomBytes(24).toString('base64url');
      const at = clock.now();
      await writeTransaction(db, async (trx) => {
        await repo.revokeAll(owner, at, trx);
        await repo.insert(owner, feedTokenHash(token), at, trx);
      });
      return { url: `${appUrl}/ical/${token}.ics`, createdAt: at.toISOString() };
    },
    async revoke(user: CurrentUser): Promise<void> {
      const owner = await ownerOf(user);
      await writeTransaction(db, (trx) => repo.revokeAll(owner, clock.now(), trx));
    },
    /** The calendar a token names, or null (unknown, revoked, or its person no longer active). */
    async calendar(token: string): Promise<string | null> {
      if (!/^[A-Za-z0-9_-]{20,64}$/.test(token)) return null;
      const owner = await repo.byHash(feedTokenHash(token));
      if (!owner) return null;
      if ('userId' in owner) {
        const user = await deps.accounts.byId(owner.userId);
        if (!user || !user.active || user.role !== 'instructor') return null;
        return instructorCalendar(user.id, user.name);
      }
      return studentCalendar(owner.studentId);
    },
  };
}
export type FeedsService = ReturnType<typeof feedsService>;
