import { TZDate } from '@date-fns/tz';
import { addDays, format } from 'date-fns';
import type { Db } from '../server/db/knex';
import type { Policy } from '../shared/schemas/policy';
import type { ApparatusKind, Gate, GearKind, Material, Structure } from '../shared/schemas/vocabulary';
import { intervalClassOfKind } from '../shared/schemas/vocabulary';

/**
 * The invented rig of the demo studio, shared by the numbered seeds. Every maker, model and
 * serial is made up. Every date is relative to the moment the seed runs ("now").
 */

// ---------------------------------------------------------------------------------------------
// Dates relative to now, in the studio's zone.

/** The instant at local wall-clock `hhmm` on the studio day `dayOffset` days from now's. */
export function localTime(now: Date, dayOffset: number, hhmm: string, timeZone: string): Date {
  const [h, m] = hhmm.split(':').map(Number);
  const day = addDays(new TZDate(now.getTime(), timeZone), dayOffset);
  day.setHours(h, m, 0, 0);
  return new Date(day.getTime());
}

/** The studio day `dayOffset` days from now's, as 'YYYY-MM-DD'. */
export function localDay(now: Date, dayOffset: number, timeZone: string): string {
  return format(addDays(new TZDate(now.getTime(), timeZone), dayOffset), 'yyyy-MM-dd');
}

/** RFC 5545 weekday of the studio day `dayOffset` days from now's. */
export function weekdayCode(now: Date, dayOffset: number, timeZone: string): string {
  return ['SU', 'MO', 'TU', 'WE', 'TH', 'FR', 'SA'][addDays(new TZDate(now.getTime(), timeZone), dayOffset).getDay()];
}

/** The studio's inspection interval for a gear kind, in days. */
export function intervalDaysOf(kind: GearKind, policy: Policy): number {
  return policy.intervalDays[intervalClassOfKind[kind]];
}

export async function userIdByEmail(trx: Db, email: string): Promise<number> {
  const row = (await trx('users').where({ email }).first('id')) as { id: number } | undefined;
  if (!row) throw new Error(`The demo seed needs the user ${email}`);
  return row.id;
}

export const RIGGER = 'rigger@loftwise.test';
export const INSTRUCTOR = 'instructor@loftwise.test';
export const JUNO = 'juno.vale@loftwise.test';
export const PIET = 'piet.arlo@loftwise.test';

// ---------------------------------------------------------------------------------------------
// Gear models (invented makers). Ratings in kN, as a rigger would type them from the marking.

export interface GearModel {
  kind: GearKind;
  material: Material;
  gate: Gate;
  prefix: string;
  maker: string;
  model: string;
  majorKn: number;
  minorKn?: number;
  gateOpenKn?: number;
  wllKn?: number;
  multiDirectional?: boolean;
  serviceLifeYears: number;
}

export const models = {
  beamClamp: { kind: 'beam_clamp', material: 'steel', gate: 'none', prefix: 'BC', maker: 'Harrowgate Hoist Works', model: 'Flange Grip FG-2', majorKn: 50, wllKn: 10, serviceLifeYears: 15 },
  roundSling: { kind: 'round_sling', material: 'polyester', gate: 'none', prefix: 'RS', maker: 'Northline Textiles', model: 'Loop 1 t round sling, 1 m', majorKn: 40, wllKn: 8, serviceLifeYears: 8 },
  spanSet: { kind: 'span_set', material: 'polyester', gate: 'none', prefix: 'SS', maker: 'Northline Textiles', model: 'Span 1.5 m', majorKn: 35, wllKn: 7, serviceLifeYears: 8 },
  steelCarabiner: { kind: 'carabiner', material: 'steel', gate: 'screw', prefix: 'CS', maker: 'Brackenford Forge', model: 'Anvil steel screwgate', majorKn: 45, minorKn: 14, gateOpenKn: 13, serviceLifeYears: 12 },
  steelAutoCarabiner: { kind: 'carabiner', material: 'steel', gate: 'auto_three_action', prefix: 'CS', maker: 'Brackenford Forge', model: 'Anvil triple-action', majorKn: 40, minorKn: 12, gateOpenKn: 12, serviceLifeYears: 12 },
  aluCarabiner: { kind: 'carabiner', material: 'aluminium', gate: 'screw', prefix: 'CA', maker: 'Ardent Alloy', model: 'Wisp HMS screwgate', majorKn: 25, minorKn: 8, gateOpenKn: 7, serviceLifeYears: 10 },
  deltaLink: { kind: 'screw_link_delta', material: 'steel', gate: 'screw', prefix: 'DL', maker: 'Ardent Alloy', model: 'Delta link 10 mm', majorKn: 30, multiDirectional: true, serviceLifeYears: 15 },
  swivel: { kind: 'swivel', material: 'steel', gate: 'none', prefix: 'SW', maker: 'Harrowgate Hoist Works', model: 'Spinwell 36 ball-bearing swivel', majorKn: 36, serviceLifeYears: 12 },
  // Apparatus: figures chosen so that a solo class of its kind passes the default factor of 5.
  fabric: { kind: 'fabric', material: 'nylon', gate: 'none', prefix: 'FB', maker: 'Northline Textiles', model: 'Low-stretch tricot, 9 m', majorKn: 28, serviceLifeYears: 5 },
  hoop: { kind: 'hoop', material: 'steel', gate: 'none', prefix: 'HP', maker: 'Silverbirch Circus Supply', model: 'Orbit 90 cm, single tab', majorKn: 24, serviceLifeYears: 10 },
  hoopTwoTab: { kind: 'hoop', material: 'steel', gate: 'none', prefix: 'HP', maker: 'Silverbirch Circus Supply', model: 'Orbit 85 cm, two tabs', majorKn: 24, serviceLifeYears: 10 },
  trapeze: { kind: 'trapeze', material: 'steel', gate: 'none', prefix: 'TZ', maker: 'Silverbirch Circus Supply', model: 'Static bar 60 cm on 12 mm ropes', majorKn: 32, serviceLifeYears: 8 },
  hammock: { kind: 'hammock', material: 'nylon', gate: 'none', prefix: 'HM', maker: 'Northline Textiles', model: 'Loop hammock, 5 m', majorKn: 28, serviceLifeYears: 5 },
  rope: { kind: 'rope', material: 'polyester', gate: 'none', prefix: 'RP', maker: 'Tarnmoor Ropeworks', model: 'Soft-lay climbing rope 30 mm, 6 m', majorKn: 36, serviceLifeYears: 6 },
} satisfies Record<string, GearModel>;
export type ModelKey = keyof typeof models;

// ---------------------------------------------------------------------------------------------
// Rooms, points and their load paths (from the structure down, the apparatus last).

export const ROOMS = { hall: 'Main Hall', loft: 'Loft Studio', store: 'Gear Room' } as const;

export interface LinkPlan {
  model: ModelKey;
  /** A fixed serial, for items the safety history names; otherwise the next of the prefix. */
  serial?: string;
  /** Days since the item went into service; a default by kind otherwise. */
  inServiceDaysAgo?: number;
  mode?: 'major' | 'minor' | 'gate_open';
  threeWay?: boolean;
  leg?: 'a' | 'b';
  includedAngleDeg?: number;
}

export interface PointPlan {
  label: string;
  room: string;
  structure: Structure;
  structuralRatingKn: number;
  apparatus: ApparatusKind[];
  maxPerformers: number;
  notes?: string;
  links: LinkPlan[];
}

const beamPath = (sling: ModelKey, connector: ModelKey, apparatus: ModelKey, swivel = true): LinkPlan[] => [
  { model: 'beamClamp' },
  { model: sling },
  { model: connector },
  ...(swivel ? [{ model: 'swivel' as const }] : []),
  { model: apparatus },
];

export const pointPlans: PointPlan[] = [
  { label: 'MH-1', room: ROOMS.hall, structure: 'beam', structuralRatingKn: 20, apparatus: ['fabric', 'hammock'], maxPerformers: 1, links: beamPath('roundSling', 'steelCarabiner', 'fabric') },
  { label: 'MH-2', room: ROOMS.hall, structure: 'beam', structuralRatingKn: 20, apparatus: ['fabric', 'hammock'], maxPerformers: 1, links: beamPath('roundSling', 'steelCarabiner', 'fabric') },
  {
    label: 'MH-3',
    room: ROOMS.hall,
    structure: 'beam',
    structuralRatingKn: 25,
    apparatus: ['fabric', 'hammock'],
    maxPerformers: 1,
    notes: 'Bridled between beams B3 and B4 to centre the fabric over the crash mat.',
    links: [
      { model: 'beamClamp', leg: 'a', includedAngleDeg: 60 },
      { model: 'spanSet', leg: 'a', includedAngleDeg: 60 },
      { model: 'beamClamp', leg: 'b', includedAngleDeg: 60 },
      { model: 'spanSet', leg: 'b', includedAngleDeg: 60 },
      { model: 'deltaLink', threeWay: true },
      { model: 'swivel' },
      { model: 'fabric' },
    ],
  },
  {
    label: 'MH-4',
    room: ROOMS.hall,
    structure: 'beam',
    structuralRatingKn: 20,
    apparatus: ['fabric', 'trapeze'],
    maxPerformers: 2,
    notes: 'Aluminium carabiner in the path: solo work only until a steel one is fitted.',
    links: beamPath('roundSling', 'aluCarabiner', 'fabric'),
  },
  { label: 'MH-5', room: ROOMS.hall, structure: 'beam', structuralRatingKn: 20, apparatus: ['trapeze', 'fabric'], maxPerformers: 2, links: beamPath('spanSet', 'steelCarabiner', 'trapeze', false) },
  { label: 'MH-6', room: ROOMS.hall, structure: 'beam', structuralRatingKn: 20, apparatus: ['trapeze', 'fabric'], maxPerformers: 2, links: beamPath('spanSet', 'steelCarabiner', 'trapeze', false) },
  { label: 'MH-7', room: ROOMS.hall, structure: 'beam', structuralRatingKn: 15, apparatus: ['hammock', 'fabric'], maxPerformers: 1, links: beamPath('roundSling', 'steelCarabiner', 'hammock', false) },
  { label: 'MH-8', room: ROOMS.hall, structure: 'beam', structuralRatingKn: 15, apparatus: ['hammock', 'fabric'], maxPerformers: 1, links: beamPath('roundSling', 'steelCarabiner', 'hammock', false) },
  { label: 'LS-1', room: ROOMS.loft, structure: 'truss', structuralRatingKn: 12, apparatus: ['hoop', 'straps'], maxPerformers: 1, links: [{ model: 'roundSling' }, { model: 'steelCarabiner' }, { model: 'swivel' }, { model: 'hoop' }] },
  { label: 'LS-2', room: ROOMS.loft, structure: 'truss', structuralRatingKn: 12, apparatus: ['hoop', 'straps'], maxPerformers: 1, links: [{ model: 'roundSling' }, { model: 'steelCarabiner' }, { model: 'swivel' }, { model: 'hoop' }] },
  { label: 'LS-3', room: ROOMS.loft, structure: 'truss', structuralRatingKn: 12, apparatus: ['hoop'], maxPerformers: 1, links: [{ model: 'roundSling' }, { model: 'steelCarabiner' }, { model: 'swivel' }, { model: 'hoop' }] },
  {
    label: 'LS-4',
    room: ROOMS.loft,
    structure: 'frame',
    structuralRatingKn: 10,
    apparatus: ['hoop'],
    maxPerformers: 1,
    notes: 'Freestanding frame by the window; top-bar rigging eye.',
    links: [{ model: 'steelAutoCarabiner' }, { model: 'swivel' }, { model: 'hoop' }],
  },
  {
    label: 'LS-5',
    room: ROOMS.loft,
    structure: 'ceiling_anchor',
    structuralRatingKn: 10,
    apparatus: ['hoop'],
    maxPerformers: 1,
    notes: 'Delta link DL-0190 is away for a thread check; a carabiner was fitted in its place.',
    links: [{ model: 'steelCarabiner' }, { model: 'swivel' }, { model: 'aluCarabiner', serial: 'CA-0150', threeWay: true, inServiceDaysAgo: 2 }, { model: 'hoopTwoTab' }],
  },
  { label: 'LS-6', room: ROOMS.loft, structure: 'ceiling_anchor', structuralRatingKn: 10, apparatus: ['rope', 'straps'], maxPerformers: 1, links: [{ model: 'steelCarabiner' }, { model: 'swivel' }, { model: 'rope' }] },
  {
    label: 'LS-7',
    room: ROOMS.loft,
    structure: 'truss',
    structuralRatingKn: 12,
    apparatus: ['rope'],
    maxPerformers: 1,
    links: [{ model: 'roundSling', serial: 'RS-0150', inServiceDaysAgo: 5 }, { model: 'steelCarabiner' }, { model: 'swivel' }, { model: 'rope' }],
  },
];

/** Unmounted stock in the Gear Room; some of it the safety history refers to by serial. */
export const stockPlans: Array<{ model: ModelKey; serial: string; inServiceDaysAgo: number; notes?: string }> = [
  { model: 'roundSling', serial: 'RS-0190', inServiceDaysAgo: 420, notes: 'Taken off LS-7 after a pulled thread; retired.' },
  { model: 'deltaLink', serial: 'DL-0190', inServiceDaysAgo: 510, notes: 'Off LS-5 for a thread check.' },
  { model: 'steelCarabiner', serial: 'CS-0190', inServiceDaysAgo: 30 },
  { model: 'steelCarabiner', serial: 'CS-0191', inServiceDaysAgo: 30 },
  { model: 'swivel', serial: 'SW-0190', inServiceDaysAgo: 30 },
  { model: 'fabric', serial: 'FB-0190', inServiceDaysAgo: 20 },
  { model: 'hoop', serial: 'HP-0190', inServiceDaysAgo: 60 },
  { model: 'hammock', serial: 'HM-0190', inServiceDaysAgo: 300 },
];
