/** Every client route in one place, so links and the router agree. */
export const paths = {
  signIn: '/sign-in',
  today: '/today',
  schedule: '/schedule',
  rig: '/rig',
  point: (id: number | string) => `/rig/points/${id}`,
  gear: '/rig/gear',
  gearItem: (id: number | string) => `/rig/gear/${id}`,
  /** A gear item's page with its own inspection form open (after an incident for a quarantined item). */
  inspectGear: (id: number | string) => `/rig/gear/${id}?inspect=1`,
  labels: '/rig/labels',
  inspections: '/inspections',
  faults: '/faults',
  /** The fault form; the QR labels' point and gear pages link here. */
  reportFault: (about: { pointId?: number | string; gearId?: number | string } = {}) =>
    `/faults/new${about.gearId !== undefined ? `?gearId=${about.gearId}` : about.pointId !== undefined ? `?pointId=${about.pointId}` : ''}`,
  /** The inspections page with a point's inspection form open. */
  inspectPoint: (id: number | string) => `/inspections?point=${id}`,
  students: '/students',
  student: (id: number | string) => `/students/${id}`,
  /** The schedule on a class's week with its drawer open. */
  scheduleClass: (id: number | string, day?: string) => `/schedule?${day ? `date=${day}&view=week&` : ''}class=${id}`,
  classTypes: '/class-types',
  staff: '/staff',
  settings: '/settings',
  mailbox: '/mailbox',
  audit: '/audit',
  account: '/account',
  /** The e-mail-link sign-in's "check your inbox" page (Auth.js's verify-request page). */
  checkEmail: '/sign-in/check-email',
  /** The public timetable (no sign-in) and the student's own pages (PRODUCT.md §11). */
  timetable: '/timetable',
  myBookings: '/my/bookings',
  myWaiver: '/my/waiver',
  myAccount: '/my/account',
} as const;
