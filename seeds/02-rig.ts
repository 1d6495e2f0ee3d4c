import type { Db } from '../server/db/knex';
import { studioRepository } from '../server/modules/studio/studio.repository';
import { intervalClassOfKind } from '../shared/schemas/vocabulary';
import { localDay, localTime, models, pointPlans, ROOMS, stockPlans, type ModelKey } from './demo-data';

/**
 * The demo rig: three rooms, fifteen points with their load paths, and the gear in them plus
 * some unmounted stock. Everything is in service here; 03-safety gives it its history.
 * Idempotent: rooms by name, points by label, gear by serial, a path only on a point without one.
 */
export async function seedRig(trx: Db, now: Date): Promise<void> {
  const { policy } = await studioRepository(trx).get(trx);
  const tz = policy.timeZone;
  const established = localTime(now, -400, '09:00', tz).toISOString();

  const roomIds = new Map<string, number>();
  for (const name of Object.values(ROOMS)) {
    const found = (await trx('rooms').where({ name }).first('id')) as { id: number } | undefined;
    const id = found?.id ?? ((await trx('rooms').insert({ name, created_at: established }).returning('id'))[0] as { id: number }).id;
    roomIds.set(name, id);
  }

  // Serials are handed out in plan order, so a second run names the same items.
  const counters = new Map<string, number>();
  const nextSerial = (prefix: string): string => {
    const n = (counters.get(prefix) ?? 100) + 1;
    counters.set(prefix, n);
    return `${prefix}-${String(n).padStart(4, '0')}`;
  };

  for (const plan of pointPlans) {
    const found = (await trx('points').where({ label: plan.label }).first('id')) as { id: number } | undefined;
    const pointId =
      found?.id ??
      (
        (
          await trx('points')
            .insert({
              room_id: roomIds.get(plan.room),
              label: plan.label,
              structure: plan.structure,
              structural_rating_kn: plan.structuralRatingKn,
              apparatus_json: JSON.stringify(plan.apparatus),
              max_performers: plan.maxPerformers,
              in_service: true,
              notes: plan.notes ?? null,
              created_at: established,
              updated_at: established,
            })
            .returning('id')
        )[0] as { id: number }
      ).id;

    const gearIds: number[] = [];
    for (const link of plan.links) {
      const serial = link.serial ?? nextSerial(models[link.model].prefix);
      gearIds.push(await ensureGear(trx, link.model, serial, link.inServiceDaysAgo, now, tz));
    }
    const hasPath = await trx('load_path_links').where({ point_id: pointId }).first('id');
    if (!hasPath) {
      await trx('load_path_links').insert(
        plan.links.map((link, position) => ({
          point_id: pointId,
          position,
          gear_id: gearIds[position],
          mode: link.mode ?? 'major',
          three_way: link.threeWay ?? false,
          basket_over_half: false,
          leg: link.leg ?? null,
          included_angle_deg: link.includedAngleDeg ?? null,
        })),
      );
    }
  }

  for (const item of stockPlans) {
    await ensureGear(trx, item.model, item.serial, item.inServiceDaysAgo, now, tz, item.notes);
  }
}

/** A small, stable spread of ages so the register does not look machine-made. */
function spread(serial: string, modulo: number): number {
  return [...serial].reduce((sum, ch) => sum * 31 + ch.charCodeAt(0), 7) % modulo;
}

async function ensureGear(trx: Db, key: ModelKey, serial: string, inServiceDaysAgo: number | undefined, now: Date, tz: string, notes?: string): Promise<number> {
  const found = (await trx('gear_items').where({ serial }).first('id')) as { id: number } | undefined;
  if (found) return found.id;
  const m = models[key];
  const textile = intervalClassOfKind[m.kind] === 'textile';
  // Textiles are younger (5–8 year lives); hardware has been up for a year or two.
  const age = inServiceDaysAgo ?? (textile ? 120 + spread(serial, 200) : 300 + spread(serial, 400));
  const made = age + 30 + spread(serial + 'm', 120);
  const entered = localTime(now, -age, '09:00', tz).toISOString();
  const [row] = await trx('gear_items')
    .insert({
      kind: m.kind,
      material: m.material,
      gate: m.gate,
      serial,
      maker: m.maker,
      model: m.model,
      major_kn: m.majorKn,
      minor_kn: 'minorKn' in m ? m.minorKn : null,
      gate_open_kn: 'gateOpenKn' in m ? m.gateOpenKn : null,
      wll_kn: 'wllKn' in m ? m.wllKn : null,
      multi_directional: 'multiDirectional' in m ? m.multiDirectional : false,
      manufactured_on: localDay(now, -made, tz),
      in_service_on: localDay(now, -age, tz),
      service_life_years: m.serviceLifeYears,
      status: 'in_service',
      status_reason: null,
      inspected_until: null,
      notes: notes ?? null,
      created_at: entered,
      updated_at: entered,
    })
    .returning('id');
  return (row as { id: number }).id;
}
