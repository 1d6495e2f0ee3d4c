import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { as, createTestApp, type TestContext } from '../helpers/app';
import { makePoint, makeRoom, makeStandardPath, makeUser } from '../helpers/factories';
import { defaultPolicy } from '../../shared/schemas/policy';

// PRODUCT.md §4.9 and issue 11: the owner sees what a policy change does before saving it, and a
// required factor below 5 needs a typed reason, shown beside the factor on every load check.

let ctx: TestContext;
beforeEach(async () => {
  ctx = await createTestApp({ now: '2026-12-01T10:00:00Z' });
});
afterEach(async () => ctx.close());

/**
 * A cleared point (yesterday; its round sling makes the interval the textile one, 30 days) hanging
 * beam clamp 50 → round sling 40 → carabiner 40 → swivel 36 → fabric 30 kN, with a silks class
 * booked on it on 3 Dec. One 90 kg performer at 5.6: W = 4.9426 kN, so the chain's 30 kN is 6.07 × W.
 */
async function bookedSilksPoint() {
  const roomId = await makeRoom(ctx.db, 'Loft');
  const p = await makePoint(ctx.db, { roomId, label: 'L-1', clearedAt: '2026-11-30T10:00:00Z', structuralRatingKn: 30 });
  await makeStandardPath(ctx.db, p.id, { apparatus: { kind: 'fabric', inspectedUntil: '2027-01-30T00:00:00Z' } });
  const [ct] = await ctx.db('class_types').insert({ name: 'Silks Basics', apparatus: 'fabric', duration_minutes: 60, capacity: 8, performers_per_point: 1, created_at: new Date().toISOString() }).returning('id');
  const instructor = await makeUser(ctx.db, { role: 'instructor' });
  const desk = await as(ctx, 'reception');
  const booked = await desk.post('/api/sessions').send({ classTypeId: (ct as { id: number }).id, instructorId: instructor.id, roomId, startsAt: '2026-12-03T18:00:00Z', endsAt: '2026-12-03T19:00:00Z', pointIds: [p.id] });
  expect(booked.status).toBe(201);
  return { pointId: p.id, sessionId: booked.body.id as number, classTypeId: (ct as { id: number }).id };
}

const policyWith = (change: Partial<typeof defaultPolicy>) => ({ ...defaultPolicy, ...change });

describe('POST /api/studio/policy/preview', () => {
  it('lists a booked class whose load check would newly fail when the required factor rises above its 6.07 ×, and saves nothing', async () => {
    const { sessionId, pointId } = await bookedSilksPoint();
    const owner = await as(ctx, 'owner');
    const res = await owner.post('/api/studio/policy/preview').send({ policy: policyWith({ requiredFactor: 8 }) });
    expect(res.status).toBe(200);
    expect(res.body.sessions).toEqual([
      expect.objectContaining({ sessionId, pointId, label: 'L-1', className: 'Silks Basics', startsAt: '2026-12-03T18:00:00.000Z', requiredFactor: 8 }),
    ]);
    expect(res.body.sessions[0].achievedFactor).toBeCloseTo(30 / ((90 * 9.80665 * 5.6) / 1000), 9);
    expect(res.body.sessions[0].violations.map((v: { code: string }) => v.code)).toEqual(['factor_below_required']);
    expect(res.body.sessions[0].violations[0].message).toContain('is 6.06 times the design load');
    // A factor rise changes no point's status.
    expect(res.body.points).toEqual([]);
    expect(res.body.checked).toEqual({ points: 1, sessions: 1 });
    expect((await owner.get('/api/studio')).body.policy.requiredFactor).toBe(5);
  });

  it('lists nothing for a factor the booked class still meets (6)', async () => {
    await bookedSilksPoint();
    const owner = await as(ctx, 'owner');
    const res = await owner.post('/api/studio/policy/preview').send({ policy: policyWith({ requiredFactor: 6 }) });
    expect(res.status).toBe(200);
    expect(res.body.sessions).toEqual([]);
  });

  it('lists a point that a one-day textile interval would turn blocked now, with its reason', async () => {
    const { pointId } = await bookedSilksPoint();
    const owner = await as(ctx, 'owner');
    const res = await owner.post('/api/studio/policy/preview').send({ policy: policyWith({ intervalDays: { textile: 1, hardware: 90, structure: 365 } }) });
    expect(res.status).toBe(200);
    expect(res.body.points).toEqual([
      expect.objectContaining({ pointId, label: 'L-1', roomName: 'Loft', before: { status: 'cleared', clearedUntil: '2026-12-30T10:00:00.000Z' } }),
    ]);
    expect(res.body.points[0].after.status).toBe('blocked');
    expect(res.body.points[0].after.reasons.map((r: { code: string }) => r.code)).toEqual(['inspection_lapsed']);
  });

  it('lists a booked class that a body-mass rise to 300 kg would make fail its factor', async () => {
    await bookedSilksPoint();
    const owner = await as(ctx, 'owner');
    // 30 kN structural rating: W at 300 kg is 16.5 kN, within; the chain's 30 kN is 1.82 × W, below 5.
    const res = await owner.post('/api/studio/policy/preview').send({ policy: policyWith({ bodyMassKg: 300 }) });
    expect(res.body.sessions).toHaveLength(1);
    expect(res.body.sessions[0].violations.map((v: { code: string }) => v.code)).toContain('factor_below_required');
  });

  it('is for the owner only', async () => {
    const rigger = await as(ctx, 'rigger');
    expect((await rigger.post('/api/studio/policy/preview').send({ policy: defaultPolicy })).status).toBe(403);
  });

  it('needs the reason for a factor below 5 before it previews', async () => {
    const owner = await as(ctx, 'owner');
    const res = await owner.post('/api/studio/policy/preview').send({ policy: policyWith({ requiredFactor: 3 }) });
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields['policy.requiredFactorReason']).toMatch(/below 5 needs a reason/);
  });
});

describe('PATCH /api/studio with a required factor below 5', () => {
  it('refuses a factor of 1 given without a reason, next to the reason field, and keeps the old factor', async () => {
    const owner = await as(ctx, 'owner');
    const res = await owner.patch('/api/studio').send({ policy: policyWith({ requiredFactor: 1 }) });
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields['policy.requiredFactorReason']).toMatch(/below 5 needs a reason/);
    const blank = await owner.patch('/api/studio').send({ policy: policyWith({ requiredFactor: 4, requiredFactorReason: '   ' }) });
    expect(blank.status).toBe(400);
    expect((await owner.get('/api/studio')).body.policy.requiredFactor).toBe(5);
  });

  it('stores the typed reason with the policy and shows it beside the factor on every load check', async () => {
    const { pointId, classTypeId } = await bookedSilksPoint();
    const owner = await as(ctx, 'owner');
    const reason = 'Static hammock work only, with the engineer’s letter of 3 Nov';
    const saved = await owner.patch('/api/studio').send({ policy: policyWith({ requiredFactor: 4, requiredFactorReason: reason }) });
    expect(saved.status).toBe(200);
    expect(saved.body.policy).toMatchObject({ requiredFactor: 4, requiredFactorReason: reason });
    const rigger = await as(ctx, 'rigger');
    const byClass = await rigger.get(`/api/points/${pointId}/load-check?classTypeId=${classTypeId}`);
    expect(byClass.body).toMatchObject({ requiredFactor: 4, requiredFactorReason: reason, pass: true });
    const custom = await rigger.get(`/api/points/${pointId}/load-check?performers=2&dynamicFactor=5.6`);
    expect(custom.body).toMatchObject({ requiredFactor: 4, requiredFactorReason: reason });
  });

  it('drops the reason when the factor goes back to 5 or more, so no stale reason sits beside it', async () => {
    const { pointId, classTypeId } = await bookedSilksPoint();
    const owner = await as(ctx, 'owner');
    await owner.patch('/api/studio').send({ policy: policyWith({ requiredFactor: 4, requiredFactorReason: 'Trial term' }) });
    const back = await owner.patch('/api/studio').send({ policy: policyWith({ requiredFactor: 6, requiredFactorReason: 'Trial term' }) });
    expect(back.status).toBe(200);
    expect(back.body.policy.requiredFactorReason).toBeNull();
    const rigger = await as(ctx, 'rigger');
    expect((await rigger.get(`/api/points/${pointId}/load-check?classTypeId=${classTypeId}`)).body.requiredFactorReason).toBeNull();
  });
});

describe('PATCH /api/studio with a value out of range', () => {
  it('names each field in words (a reminder at 0 hours, a cut-off past 14 days) and saves nothing', async () => {
    const owner = await as(ctx, 'owner');
    const res = await owner.patch('/api/studio').send({ policy: policyWith({ reminderLeadHours: [24, 0], studentCancelCutoffHours: 400 }) });
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields).toEqual({
      'policy.reminderLeadHours.1': 'Each reminder at least 0.25 hours (15 minutes) before class',
      'policy.studentCancelCutoffHours': 'At most 336 hours (14 days) before class',
    });
    const policy = (await owner.get('/api/studio')).body.policy;
    expect(policy).toMatchObject({ reminderLeadHours: defaultPolicy.reminderLeadHours, studentCancelCutoffHours: defaultPolicy.studentCancelCutoffHours });
  });
});
