import { z } from 'zod';

/** Wire words of PRODUCT.md §3 and §6.1. One list each; every other module imports these. */
export const roles = ['owner', 'reception', 'instructor', 'rigger', 'student'] as const;
export const roleSchema = z.enum(roles);
export type Role = z.infer<typeof roleSchema>;
/** The roles of the studio's staff: every role but `student` (PRODUCT.md §2, §11). Staff accounts take only these. */
export const staffRoles = ['owner', 'reception', 'instructor', 'rigger'] as const;
export const staffRoleSchema = z.enum(staffRoles);
export type StaffRole = z.infer<typeof staffRoleSchema>;

export const apparatusKinds = ['fabric', 'hoop', 'trapeze', 'hammock', 'straps', 'rope'] as const;
export const apparatusKindSchema = z.enum(apparatusKinds);
export type ApparatusKind = z.infer<typeof apparatusKindSchema>;

export const connectorKinds = ['carabiner', 'screw_link_delta', 'screw_link_tri', 'quick_link'] as const;
export const fixedGearKinds = [
  ...connectorKinds,
  'swivel',
  'descender_ring',
  'round_sling',
  'span_set',
  'wire_rope_sling',
  'beam_clamp',
  'pulley',
] as const;
export const gearKinds = [...fixedGearKinds, ...apparatusKinds] as const;
export const gearKindSchema = z.enum(gearKinds);
export type GearKind = z.infer<typeof gearKindSchema>;

export const materials = ['steel', 'aluminium', 'polyester', 'nylon'] as const;
export const materialSchema = z.enum(materials);
export type Material = z.infer<typeof materialSchema>;

export const gates = ['none', 'screw', 'auto_two_action', 'auto_three_action'] as const;
export const gateSchema = z.enum(gates);
export type Gate = z.infer<typeof gateSchema>;

export const structures = ['beam', 'truss', 'ceiling_anchor', 'frame'] as const;
export const structureSchema = z.enum(structures);
export type Structure = z.infer<typeof structureSchema>;

export const loadingModes = ['major', 'minor', 'gate_open'] as const;
export const loadingModeSchema = z.enum(loadingModes);
export type LoadingMode = z.infer<typeof loadingModeSchema>;

export const bridleLegs = ['a', 'b'] as const;
export const bridleLegSchema = z.enum(bridleLegs);
export type BridleLeg = z.infer<typeof bridleLegSchema>;

export const gearStatuses = ['in_service', 'quarantined', 'retired'] as const;
export const gearStatusSchema = z.enum(gearStatuses);
export type GearStatus = z.infer<typeof gearStatusSchema>;

export const gearEventKinds = ['arrested_fall', 'shock_load', 'drop', 'overload'] as const;
export const gearEventKindSchema = z.enum(gearEventKinds);
export type GearEventKind = z.infer<typeof gearEventKindSchema>;

export const severities = ['low', 'medium', 'high'] as const;
export const severitySchema = z.enum(severities);
export type Severity = z.infer<typeof severitySchema>;

export const faultResolutions = ['repaired', 'replaced', 'retired', 'no_fault_found'] as const;
export const faultResolutionSchema = z.enum(faultResolutions);
export type FaultResolution = z.infer<typeof faultResolutionSchema>;

export const inspectionResults = ['pass', 'attention', 'fail'] as const;
export const inspectionResultSchema = z.enum(inspectionResults);
export type InspectionResult = z.infer<typeof inspectionResultSchema>;

export const units = ['kN', 'lbf', 'kgf'] as const;
export const unitSchema = z.enum(units);
export type ForceUnit = z.infer<typeof unitSchema>;

export const pointStatuses = ['cleared', 'expiring', 'blocked'] as const;
export type PointStatusWord = (typeof pointStatuses)[number];

/** Which inspection interval of the policy a kind falls under (CHECK-VALUES.md, studio choice). */
export type IntervalClass = 'textile' | 'hardware' | 'structure';
export const intervalClassOfKind: Record<GearKind, Exclude<IntervalClass, 'structure'>> = {
  carabiner: 'hardware',
  screw_link_delta: 'hardware',
  screw_link_tri: 'hardware',
  quick_link: 'hardware',
  swivel: 'hardware',
  descender_ring: 'hardware',
  round_sling: 'textile',
  span_set: 'textile',
  wire_rope_sling: 'hardware',
  beam_clamp: 'hardware',
  pulley: 'hardware',
  fabric: 'textile',
  hoop: 'hardware',
  trapeze: 'textile',
  hammock: 'textile',
  straps: 'textile',
  rope: 'textile',
};

export function isApparatusKind(kind: string): kind is ApparatusKind {
  return (apparatusKinds as readonly string[]).includes(kind);
}
export function isConnectorKind(kind: string): boolean {
  return (connectorKinds as readonly string[]).includes(kind);
}

/** A student's place in a class (PRODUCT.md §11). */
export const placeStatuses = ['booked', 'waitlisted', 'cancelled', 'attended', 'no_show'] as const;
export const placeStatusSchema = z.enum(placeStatuses);
export type PlaceStatus = z.infer<typeof placeStatusSchema>;

/** How a waiver was accepted: typed online by the student, or recorded by the desk from paper. */
export const waiverMethods = ['online', 'paper'] as const;
export const waiverMethodSchema = z.enum(waiverMethods);
export type WaiverMethod = z.infer<typeof waiverMethodSchema>;
