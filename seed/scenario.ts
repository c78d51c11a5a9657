// The invented demo scenario: one contracting business, its staff, four farms in two time
// zones and two farm clients who share no farm. Every name and place here is made up.
import type { Role } from '../shared/schemas/common.ts'

export const DEMO_PASSWORD = 'skyfurrow-demo'

export const demoBusinessName = 'Larkspur Ridge Custom Ag'

export interface DemoFarm {
  key: string
  name: string
  timeZone: string
  address: string
  notes: string
}

export const demoFarms: DemoFarm[] = [
  {
    key: 'north',
    name: 'Hollis Creek Farms',
    timeZone: 'America/Chicago',
    address: '2217 County Road M, near Alder Falls, Iowa',
    notes: 'Corn and soybeans on rolling ground. A cottonwood shelterbelt runs along the north edge of the home quarter.',
  },
  {
    key: 'south',
    name: 'Juniper Bend Ranch',
    timeZone: 'America/Chicago',
    address: '48 Old Ferry Lane, Pecan Hollow, Kansas',
    notes: 'Wheat and sorghum. Tile drainage planned on the low ground by the creek; pecan grove on the west side.',
  },
  {
    key: 'plains',
    name: 'Tall Sky Grain Co-op Plots',
    timeZone: 'America/Denver',
    address: 'Section 14, Sagebrush Road, Cold Spring Flats, Colorado',
    notes: 'Irrigated pivots and dryland strips. Windbreak of Rocky Mountain juniper on the west fence line.',
  },
  {
    key: 'valley',
    name: 'Meadowlark Bottoms',
    timeZone: 'America/Denver',
    address: '903 River Bench Road, Willow Gap, Nebraska',
    notes: 'Sugar beets and dry beans; land levelling on the bench fields this spring.',
  },
]

export interface DemoUser {
  email: string
  name: string
  role: Role
  units: 'metric' | 'imperial'
  /** Keys of demoFarms a client user is linked to. */
  farms: string[]
}

export const demoUsers: DemoUser[] = [
  { email: 'admin@demo.skyfurrow.test', name: 'Noor Vandersloot', role: 'admin', units: 'imperial', farms: [] },
  { email: 'office@demo.skyfurrow.test', name: 'Priya Castellanos', role: 'office', units: 'imperial', farms: [] },
  { email: 'crew@demo.skyfurrow.test', name: 'Wade Ostrowski', role: 'contractor', units: 'imperial', farms: [] },
  {
    email: 'client.north@demo.skyfurrow.test',
    name: 'Elsie Marchbanks',
    role: 'client',
    units: 'imperial',
    farms: ['north'],
  },
  {
    email: 'client.south@demo.skyfurrow.test',
    name: 'Tobias Redfern',
    role: 'client',
    units: 'metric',
    farms: ['south', 'valley'],
  },
]

/** Constellations the demo contractor's receivers track (nominal orbit data for each). */
export const demoConstellations: Array<{ system: 'GPS' | 'GLONASS' | 'Galileo' | 'BeiDou'; enabled: boolean }> = [
  { system: 'GPS', enabled: true },
  { system: 'GLONASS', enabled: true },
  { system: 'Galileo', enabled: false },
  { system: 'BeiDou', enabled: false },
]
