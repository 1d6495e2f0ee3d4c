import type { Db } from '../../db/knex';
import { valueTaken } from '../../db/queries';
import type { ClassType, CreateClassType, UpdateClassType } from '../../../shared/schemas/class-types';

interface Row {
  id: number;
  name: string;
  apparatus: ClassType['apparatus'];
  duration_minutes: number;
  capacity: number;
  performers_per_point: number;
  dynamic_factor: number | null;
  body_mass_kg: number | null;
  active: number | boolean;
}
const toClassType = (r: Row): ClassType => ({
  id: r.id,
  name: r.name,
  apparatus: r.apparatus,
  durationMinutes: r.duration_minutes,
  capacity: r.capacity,
  performersPerPoint: r.performers_per_point,
  dynamicFactor: r.dynamic_factor,
  bodyMassKg: r.body_mass_kg,
  active: Boolean(r.active),
});

export function classTypesRepository(db: Db) {
  return {
    async list(): Promise<ClassType[]> {
      return (await db<Row>('class_types').orderBy('name')).map(toClassType);
    },
    async byId(id: number, trx: Db = db): Promise<ClassType | null> {
      const r = await trx<Row>('class_types').where({ id }).first();
      return r ? toClassType(r) : null;
    },
    nameTaken: (name: string, exceptId?: number) => valueTaken(db, 'class_types', 'name', name, exceptId),
    async update(id: number, patch: UpdateClassType, trx: Db): Promise<void> {
      const row: Record<string, unknown> = {};
      if (patch.name !== undefined) row.name = patch.name;
      if (patch.active !== undefined) row.active = patch.active;
      if (Object.keys(row).length) await trx('class_types').where({ id }).update(row);
    },
    async insert(c: CreateClassType, at: Date, trx: Db = db): Promise<number> {
      const [row] = await trx('class_types')
        .insert({
          name: c.name,
          apparatus: c.apparatus,
          duration_minutes: c.durationMinutes,
          capacity: c.capacity,
          performers_per_point: c.performersPerPoint,
          dynamic_factor: c.dynamicFactor ?? null,
          body_mass_kg: c.bodyMassKg ?? null,
          active: true,
          created_at: at.toISOString(),
        })
        .returning('id');
      return (row as { id: number }).id;
    },
  };
}
export type ClassTypesRepository = ReturnType<typeof classTypesRepository>;
