import { z } from 'zod';
import { dateSchema, idSchema, labelText } from './common';
import {
  apparatusKindSchema,
  bridleLegSchema,
  gateSchema,
  gearEventKindSchema,
  gearKindSchema,
  gearStatusSchema,
  loadingModeSchema,
  materialSchema,
  structureSchema,
} from './vocabulary';

const kn = (what: string) => z.number({ message: `${what} must be a number in kN` }).positive(`${what} must be above zero`).max(2000, `${what} looks too large for kN — was it typed in lbf?`);
const text = (max: number) => z.string().trim().max(max, `Keep it under ${max} characters`);

// ---- rooms
export const createRoomSchema = z.object({ name: labelText(80, 'Enter a room name') });
export type CreateRoom = z.infer<typeof createRoomSchema>;
export const roomSchema = z.object({ id: z.number(), name: z.string(), pointCount: z.number().optional() });
export type Room = z.infer<typeof roomSchema>;

// ---- points
const pointFields = {
  roomId: idSchema,
  label: labelText(40, 'Enter a label such as B-2'),
  structure: structureSchema,
  structuralRatingKn: kn('The structural rating'),
  apparatus: z.array(apparatusKindSchema).max(6).refine((a) => new Set(a).size === a.length, 'List each apparatus once'),
  maxPerformers: z.number().int('Whole performers only').min(1, 'At least one performer').max(10, 'At most 10 performers'),
  inService: z.boolean().optional(),
  notes: text(2000).optional(),
};
export const createPointSchema = z.object(pointFields);
export type CreatePoint = z.infer<typeof createPointSchema>;
export const updatePointSchema = z.object(pointFields).partial().strict();
export type UpdatePoint = z.infer<typeof updatePointSchema>;

export const reasonSchema = z.object({ code: z.string(), message: z.string() });
export type ReasonWire = z.infer<typeof reasonSchema>;
export const pointStatusSchema = z.object({
  status: z.enum(['cleared', 'expiring', 'blocked']),
  clearedUntil: z.string().nullable(),
  reasons: z.array(reasonSchema),
});
export type PointStatusWire = z.infer<typeof pointStatusSchema>;

// ---- gear
const optionalKn = (what: string) => kn(what).nullable().optional();
const gearFields = {
  kind: gearKindSchema,
  material: materialSchema,
  gate: gateSchema,
  majorKn: kn('The major-axis rating'),
  minorKn: optionalKn('The minor-axis rating'),
  gateOpenKn: optionalKn('The gate-open rating'),
  wllKn: optionalKn('The working load limit'),
  multiDirectional: z.boolean(),
  serial: labelText(60, 'Enter the serial or lot number'),
  maker: labelText(80).nullable().optional(),
  model: labelText(80).nullable().optional(),
  manufacturedOn: dateSchema.nullable().optional(),
  inServiceOn: dateSchema.nullable().optional(),
  serviceLifeYears: z.number().min(0.5, 'At least half a year').max(100).nullable().optional(),
  notes: text(2000).nullable().optional(),
};
/** The earliest date the register accepts for manufacture or service: older rigging is not in use. */
export const EARLIEST_GEAR_DATE = '1950-01-01';
/** An item may be registered before it goes into use, up to this many days ahead. */
export const IN_SERVICE_AHEAD_DAYS = 366;

type GearFacts = { majorKn?: number; minorKn?: number | null; gateOpenKn?: number | null; wllKn?: number | null; manufacturedOn?: string | null; inServiceOn?: string | null };
type GearFactField = 'minorKn' | 'gateOpenKn' | 'wllKn' | 'manufacturedOn' | 'inServiceOn';

/** 'YYYY-MM-DD' plus `days` calendar days. */
export function addCalendarDays(day: string, days: number): string {
  const d = new Date(`${day}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() + days);
  return d.toISOString().slice(0, 10);
}

/**
 * Gear data that cannot be true, by field, in product words (PRODUCT.md §3): a rating above the
 * major-axis breaking strength (a working load limit is a fraction of it; a connector is never
 * stronger across its axis or gate open), a manufacture date after `today` or before 1950, a
 * service start before manufacture or before 1950. A service start ahead of today is allowed, up
 * to a year: gear is registered before it goes into use. `today` is the studio's calendar day;
 * dates compare as 'YYYY-MM-DD' text. Used by the schemas (so the form shows the same message)
 * and by the server on the record as an edit leaves it.
 */
export function impossibleGearFacts(g: GearFacts, today: string): Partial<Record<GearFactField, string>> {
  const found: Partial<Record<GearFactField, string>> = {};
  if (g.majorKn !== undefined) {
    if (g.minorKn != null && g.minorKn > g.majorKn) found.minorKn = 'The minor-axis rating cannot exceed the major-axis rating';
    if (g.gateOpenKn != null && g.gateOpenKn > g.majorKn) found.gateOpenKn = 'The gate-open rating cannot exceed the major-axis rating';
    if (g.wllKn != null && g.wllKn > g.majorKn) found.wllKn = 'The working load limit cannot exceed the major-axis breaking strength: check the marking';
  }
  const made = g.manufacturedOn ?? null;
  const since = g.inServiceOn ?? null;
  if (made !== null) {
    if (made > today) found.manufacturedOn = 'The manufacture date cannot be in the future';
    else if (made < EARLIEST_GEAR_DATE) found.manufacturedOn = 'Check the manufacture date: rigging made before 1950 is not accepted';
  }
  if (since !== null) {
    if (since < EARLIEST_GEAR_DATE) found.inServiceOn = 'Check the date it went into service: before 1950 is not accepted';
    else if (made !== null && since < made) found.inServiceOn = 'It cannot go into service before it was manufactured';
    else if (since > addCalendarDays(today, IN_SERVICE_AHEAD_DAYS)) found.inServiceOn = 'Enter a service date within the next year';
  }
  return found;
}

/**
 * The schema's side of impossibleGearFacts. Its "today" is the latest calendar day anywhere
 * (UTC + 1 day), so a studio east of UTC is never refused its own today; the server checks again
 * with the studio's day from its clock.
 */
function factsRefinement(g: GearFacts, ctx: z.RefinementCtx) {
  const latestToday = addCalendarDays(new Date().toISOString().slice(0, 10), 1);
  for (const [field, message] of Object.entries(impossibleGearFacts(g, latestToday))) ctx.addIssue({ code: 'custom', path: [field], message });
}
export const createGearSchema = z.object(gearFields).superRefine(factsRefinement);
export type CreateGear = z.infer<typeof createGearSchema>;
export const updateGearSchema = z.object(gearFields).partial().strict().superRefine(factsRefinement);
export type UpdateGear = z.infer<typeof updateGearSchema>;

export const gearSchema = z.object({
  id: z.number(),
  kind: gearKindSchema,
  material: materialSchema,
  gate: gateSchema,
  majorKn: z.number(),
  minorKn: z.number().nullable(),
  gateOpenKn: z.number().nullable(),
  wllKn: z.number().nullable(),
  multiDirectional: z.boolean(),
  serial: z.string(),
  maker: z.string().nullable(),
  model: z.string().nullable(),
  manufacturedOn: z.string().nullable(),
  inServiceOn: z.string().nullable(),
  serviceLifeYears: z.number().nullable(),
  notes: z.string().nullable(),
  status: gearStatusSchema,
  statusReason: z.string().nullable(),
  inspectedUntil: z.string().nullable(),
  serviceLifeEndsOn: z.string().nullable(),
  /** The point whose load path holds the item, if any. */
  pointId: z.number().nullable(),
  pointLabel: z.string().nullable(),
});
export type Gear = z.infer<typeof gearSchema>;

export const gearListQuery = z.object({
  q: z.string().max(80).optional(),
  kind: gearKindSchema.optional(),
  status: gearStatusSchema.optional(),
  /** Items whose own inspection runs out within this many days (or has run out). */
  inspectionDueDays: z.coerce.number().int().min(0).max(3650).optional(),
  /** Items whose service life ends within this many days (or has ended). */
  lifeEndingDays: z.coerce.number().int().min(0).max(36500).optional(),
  mounted: z.enum(['yes', 'no']).optional(),
});
export type GearListQuery = z.infer<typeof gearListQuery>;

export const reasonBodySchema = z.object({ reason: text(500).min(1, 'Say why') });

/** PRODUCT.md §4.7: mount an apparatus on a point, swapping only the apparatus link. */
export const mountApparatusSchema = z.object({ gearId: idSchema });
export type MountApparatus = z.infer<typeof mountApparatusSchema>;
export const gearEventBodySchema = z.object({ kind: gearEventKindSchema, note: text(2000).default('') });
export type GearEventBody = z.infer<typeof gearEventBodySchema>;
export const gearEventSchema = z.object({ id: z.number(), gearId: z.number(), kind: gearEventKindSchema, note: z.string(), recordedAt: z.string(), recordedBy: z.string().nullable() });
export type GearEvent = z.infer<typeof gearEventSchema>;

// ---- load path
export const linkBodySchema = z
  .object({
    gearId: idSchema,
    mode: loadingModeSchema,
    threeWay: z.boolean(),
    basketOverHalf: z.boolean(),
    leg: bridleLegSchema.nullable().optional(),
    includedAngleDeg: z.number().min(0, 'The angle is at least 0°').lt(180, 'The included angle must be below 180°').nullable().optional(),
  })
  .superRefine((l, ctx) => {
    if (l.leg && l.includedAngleDeg == null) ctx.addIssue({ code: 'custom', path: ['includedAngleDeg'], message: 'A bridle leg needs its included angle' });
  });
export const loadPathBodySchema = z
  .object({ links: z.array(linkBodySchema).max(20, 'At most 20 links in one path') })
  .superRefine((b, ctx) => {
    const seen = new Set<number>();
    b.links.forEach((l, i) => {
      if (seen.has(l.gearId)) ctx.addIssue({ code: 'custom', path: ['links', i, 'gearId'], message: 'A gear item can appear only once in a path' });
      seen.add(l.gearId);
    });
  });
export type LoadPathBody = z.infer<typeof loadPathBodySchema>;

export const linkSchema = z.object({
  position: z.number(),
  gearId: z.number(),
  mode: loadingModeSchema,
  threeWay: z.boolean(),
  basketOverHalf: z.boolean(),
  leg: bridleLegSchema.nullable(),
  includedAngleDeg: z.number().nullable(),
  gear: gearSchema,
});
export type Link = z.infer<typeof linkSchema>;

export const pointSchema = z.object({
  id: z.number(),
  roomId: z.number(),
  roomName: z.string(),
  label: z.string(),
  structure: structureSchema,
  structuralRatingKn: z.number(),
  apparatus: z.array(apparatusKindSchema),
  maxPerformers: z.number(),
  inService: z.boolean(),
  notes: z.string().nullable(),
  lastClearedAt: z.string().nullable(),
  clearanceVoidedAt: z.string().nullable(),
  status: pointStatusSchema,
  links: z.array(linkSchema).optional(),
});
export type Point = z.infer<typeof pointSchema>;

// ---- load check
export const loadCheckQuery = z.union([
  z.object({ classTypeId: idSchema }),
  z.object({
    performers: z.coerce.number().int().min(1).max(10),
    bodyMassKg: z.coerce.number().min(20).max(300).optional(),
    dynamicFactor: z.coerce.number().min(1).max(20),
  }),
], { message: 'Give classTypeId, or performers and dynamicFactor (bodyMassKg defaults to the policy)' });
export type LoadCheckQuery = z.infer<typeof loadCheckQuery>;

export const findingSchema = z.object({ code: z.string(), message: z.string(), linkIndex: z.number().optional() });
export const loadCheckSchema = z.object({
  chainStrengthKn: z.number().nullable(),
  designLoadKn: z.number(),
  achievedFactor: z.number().nullable(),
  requiredFactor: z.number(),
  /** The owner's reason for a required factor below 5, shown beside the factor. */
  requiredFactorReason: z.string().nullable().optional(),
  structuralRatingKn: z.number(),
  pass: z.boolean(),
  violations: z.array(findingSchema),
  warnings: z.array(findingSchema),
  working: z.array(z.object({ step: z.string(), label: z.string(), inputs: z.record(z.string(), z.union([z.number(), z.string(), z.null()])), output: z.union([z.number(), z.string(), z.null()]), unit: z.string().optional() })),
  profile: z.object({ performers: z.number(), bodyMassKg: z.number(), dynamicFactor: z.number() }).optional(),
});
export type LoadCheck = z.infer<typeof loadCheckSchema>;

// ---- documents
export const documentKinds = ['assessment', 'certificate', 'photo', 'other'] as const;
export const documentSchema = z.object({
  id: z.number(),
  ownerType: z.enum(['point', 'gear', 'fault', 'inspection']),
  ownerId: z.number(),
  kind: z.enum(documentKinds),
  originalName: z.string(),
  mime: z.string(),
  size: z.number(),
  uploadedAt: z.string(),
  url: z.string(),
});
export type DocumentWire = z.infer<typeof documentSchema>;
export const uploadFieldsSchema = z.object({ kind: z.enum(documentKinds).default('other') });
