// The demo scenario's RTK correction sources (invented): three of the contractor's own base
// stations and one correction network. The Iowa farm works from the base in its yard; the
// Nebraska farm from a base on a grain leg north-west of its benches, whose radio reaches
// 4.7 km, so the far corner of Beet Ground (about 5 km away) is out of range and its RTK
// hours are Closed; the Kansas and Colorado farms lie inside the network's coverage and use
// its nearest mount point; the hill farm in Pennsylvania (seed/terrain.ts) from a base on
// the ridge above its hollow.
//
// Idempotent: the sources are added only while there are none, in one transaction.
import type { Database } from '../server/db/index.ts'
import { createStore, type Repositories } from '../server/db/repositories/index.ts'

const M_PER_DEG_LAT = 111_320
const r7 = (x: number) => Math.round(x * 1e7) / 1e7
/** lon/lat `e` m east and `n` m north of an origin (flat-earth, fine over a few km). */
function at([lon, lat]: [number, number], e: number, n: number) {
  return { lonDeg: r7(lon + e / (M_PER_DEG_LAT * Math.cos((lat * Math.PI) / 180))), latDeg: r7(lat + n / M_PER_DEG_LAT) }
}

// Farm origins as in seed/fields.ts.
const IOWA: [number, number] = [-93.4127, 42.3183]
const KANSAS: [number, number] = [-97.8342, 38.0716]
const COLORADO: [number, number] = [-103.5521, 40.4237]
const NEBRASKA: [number, number] = [-103.7188, 41.8634]
// The hill farm's origin as in seed/terrain.ts.
const PENNSYLVANIA: [number, number] = [-77.418, 41.262]

export const demoBases = [
  { name: 'Hollis yard base', ...at(IOWA, 1500, 1200), antennaHeightM: 6, radioRangeKm: 15, note: 'On the machine-shed roof; UHF radio.' },
  { name: 'Meadowlark grain-leg base', ...at(NEBRASKA, -2500, -1500), antennaHeightM: 30, radioRangeKm: 4.7, note: 'Low-power radio on the grain leg; hills to the east cut it short.' },
  { name: 'Larch Gap ridge base', ...at(PENNSYLVANIA, -900, 1400), antennaHeightM: 8, radioRangeKm: 12, note: 'On the west ridge above the hollow, clear of the valley walls.' },
]

export const demoNetwork = {
  name: 'Prairie Reference Network',
  coverage: {
    type: 'Polygon' as const,
    coordinates: [[[-104.5, 37.5], [-96.5, 37.5], [-96.5, 41.0], [-104.5, 41.0], [-104.5, 37.5]]],
  },
  mountPoints: [
    { name: 'PRN-KS07', ...at(KANSAS, 2500, 1500) },
    { name: 'PRN-CO12', ...at(COLORADO, -1800, 2600) },
    { name: 'PRN-KS02', latDeg: 38.55, lonDeg: -99.3 },
  ],
  note: 'Subscription network (invented); corrections over the cellular link.',
}

export async function seedCorrectionsWith(repos: Repositories): Promise<{ bases: number; networks: number }> {
  if ((await repos.corrections.listBases()).length > 0 || (await repos.corrections.listNetworks()).length > 0) return { bases: 0, networks: 0 }
  for (const b of demoBases) await repos.corrections.insertBase(b)
  await repos.corrections.insertNetwork({
    name: demoNetwork.name,
    coverage: JSON.stringify(demoNetwork.coverage),
    mountPointsJson: JSON.stringify(demoNetwork.mountPoints),
    note: demoNetwork.note,
  })
  return { bases: demoBases.length, networks: 1 }
}

export async function seedCorrections(db: Database) {
  return createStore(db).transaction((repos) => seedCorrectionsWith(repos))
}
