/** Audit actions in plain words; an action not listed here is shown by its code. */
const actionWords: Record<string, string> = {
  'user.created': 'Added a staff member',
  'user.updated': 'Changed a staff member',
  'user.role_changed': 'Changed a role',
  'user.password_reset': 'Reset a password',
  'room.created': 'Added a room',
  'point.created': 'Added a point',
  'point.updated': 'Changed a point',
  'point.load_path_replaced': 'Changed a load path',
  'point.cleared': 'Cleared a point',
  'point.inspected': 'Inspected a point (not cleared)',
  'point.preuse_checked': 'Pre-use check',
  'gear.created': 'Added gear',
  'gear.updated': 'Changed gear',
  'gear.inspected': 'Inspected gear',
  'gear.retired': 'Retired gear',
  'gear.quarantined': 'Quarantined gear',
  'gear.event_recorded': 'Recorded a gear event',
  'fault.opened': 'Reported a fault',
  'fault.resolved': 'Resolved a fault',
  'class_type.created': 'Added a class type',
  'class_type.updated': 'Renamed a class type',
  'class_type.retired': 'Retired a class type',
  'class_type.restored': 'Brought back a class type',
  'session.booked': 'Booked a class',
  'session.changed': 'Changed a class',
  'session.room_changed': 'Moved a class to another room',
  'session.points_swapped': 'Swapped a class’s points',
  'session.cancelled': 'Cancelled a class',
  'policy.updated': 'Changed the policy',
  'document.added': 'Added a document',
  'document.removed': 'Removed a document',
};
export const actionText = (action: string) => actionWords[action] ?? action;

const entityWords: Record<string, string> = {
  user: 'Staff member',
  room: 'Room',
  point: 'Point',
  gear: 'Gear item',
  fault: 'Fault',
  class_type: 'Class type',
  session: 'Class',
  studio: 'Studio',
  document: 'Document',
  inspection: 'Inspection',
};
export const entityText = (entity: string) => entityWords[entity] ?? entity;

/** A before/after value in one short line for the table. */
export function describeValue(v: unknown): string {
  if (v === null || v === undefined) return '';
  if (typeof v !== 'object') return String(v);
  return Object.entries(v as Record<string, unknown>)
    .map(([k, x]) => `${k}: ${typeof x === 'object' && x !== null ? JSON.stringify(x) : String(x)}`)
    .join(' · ');
}
