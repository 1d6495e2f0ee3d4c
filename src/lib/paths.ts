/** Every client route in one place, so links and the router agree. */
export const paths = {
  signIn: '/sign-in',
  today: '/today',
  schedule: '/schedule',
  rig: '/rig',
  point: (id: number | string) => `/rig/points/${id}`,
  gear: '/rig/gear',
  gearItem: (id: number | string) => `/rig/gear/${id}`,
  inspections: '/inspections',
  faults: '/faults',
  staff: '/staff',
  settings: '/settings',
  mailbox: '/mailbox',
} as const;
