import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { as, createTestApp, type TestContext } from '../helpers/app';
import { makeGear, makePoint } from '../helpers/factories';

/* PRODUCT.md §4.2 as amended, through the real app: the rigger saves a path, anyone reads its check. */

let ctx: TestContext;
beforeEach(async () => {
  ctx = await createTestApp({ now: '2026-12-01T10:00:00Z' });
});
afterEach(async () => ctx.close());

const silks = 'performers=1&bodyMassKg=90&dynamicFactor=5.6';
const codes = (list: Array<{ code: string }>) => list.map((f) => f.code);
const link = (gearId: number, o: Record<string, unknown> = {}) => ({ gearId, mode: 'major', threeWay: false, basketOverHalf: false, ...o });

describe('GET /api/points/:id/load-check after the §4.2 amendments', () => {
  it('lists three_way_on_connector for a plain carabiner where a 90° bridle meets, its three-way box unticked [common practice]', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db, { structuralRatingKn: 20 });
    const legA = await makeGear(ctx.db, { kind: 'round_sling', material: 'polyester', majorKn: 40 });
    const legB = await makeGear(ctx.db, { kind: 'round_sling', material: 'polyester', majorKn: 40 });
    const biner = await makeGear(ctx.db, { kind: 'carabiner', majorKn: 45, minorKn: 14, gateOpenKn: 13, serial: 'CS-MEET' });
    const fabric = await makeGear(ctx.db, { kind: 'fabric', material: 'nylon', majorKn: 30, inspectedUntil: '2027-01-01T00:00:00Z' });
    const saved = await rigger.put(`/api/points/${p.id}/load-path`).send({
      links: [link(legA, { leg: 'a', includedAngleDeg: 90 }), link(legB, { leg: 'b', includedAngleDeg: 90 }), link(biner, { threeWay: false }), link(fabric)],
    });
    expect(saved.status).toBe(200);
    expect(saved.body.links[2].threeWay).toBe(false); // stored as the rigger left it

    const check = await rigger.get(`/api/points/${p.id}/load-check?${silks}`);
    expect(check.status).toBe(200);
    expect(check.body.pass).toBe(false);
    const finding = check.body.violations.find((v: { code: string }) => v.code === 'three_way_on_connector');
    expect(finding).toMatchObject({ linkIndex: 2 });
    expect(finding.message).toContain('CS-MEET');
    // And the point reads blocked for it, by rule.
    expect(codes((await rigger.get(`/api/points/${p.id}/status`)).body.reasons)).toContain('rule_violation');
  });

  it('counts a 25 kN connector with no minor rating at 7 kN across its minor axis, warning minor_rating_assumed [published: EN 12275:2013, via a test-house summary]', async () => {
    const rigger = await as(ctx, 'rigger');
    const p = await makePoint(ctx.db, { structuralRatingKn: 20 });
    const sling = await makeGear(ctx.db, { kind: 'round_sling', material: 'polyester', majorKn: 40 });
    const biner = await makeGear(ctx.db, { kind: 'carabiner', material: 'aluminium', majorKn: 25, minorKn: null, gateOpenKn: 8, serial: 'CA-25' });
    const fabric = await makeGear(ctx.db, { kind: 'fabric', material: 'nylon', majorKn: 30, inspectedUntil: '2027-01-01T00:00:00Z' });
    expect((await rigger.put(`/api/points/${p.id}/load-path`).send({ links: [link(sling), link(biner, { mode: 'minor' }), link(fabric)] })).status).toBe(200);

    const check = (await rigger.get(`/api/points/${p.id}/load-check?${silks}`)).body;
    // The class K minor-axis minimum is 7 kN; 30 % of 25 kN would be 7.5 kN, above it.
    expect(check.chainStrengthKn).toBe(7);
    const warning = check.warnings.find((w: { code: string }) => w.code === 'minor_rating_assumed');
    expect(warning.message).toContain('CA-25');
    expect(warning.message).toMatch(/counted at 7(\.0+)? kN/);
    expect(codes(check.violations)).toContain('factor_below_required');
  });
});
