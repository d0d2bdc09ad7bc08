import type { UserRole } from '../types/auth'

/** The demo sign-ins created by the seed, printed by `npm start` and listed in the README. */
export const demoAccounts: { role: UserRole, email: string, name: string, password: string }[] = [
  { role: 'maker', email: 'maker@groovewright.test', name: 'Ada Tallowmere', password: 'bench-and-mandrel-26' },
  { role: 'shipper', email: 'shipper@groovewright.test', name: 'Ned Parcelwick', password: 'padded-tube-26' },
  { role: 'collector', email: 'collector@groovewright.test', name: 'Iris Quillfeather', password: 'two-minute-wax-26' },
]
