// The authorization matrix: every API route registered on the app is called as anonymous,
// as each role, and as a client of another farm, and the status must match the table below.
// A route without a row fails the test, and so does a row without a route.
//
// Adding a route: add one row keyed 'METHOD /api/path/:param'. `call` fills the path
// parameters and the body (and may create throwaway data, e.g. something to delete);
// `expect` gives the status for each caller. Mutating calls by allowed callers should
// really succeed (2xx) where that is cheap, so the row proves more than "not 403".
import { createHash, randomBytes } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import {
  Client,
  demo,
  signIn,
  startTestServer,
  unique,
  waitForMail,
  type TestServer,
} from '../support/server.ts'
import { listRoutes } from '../support/routes.ts'

const callers = ['anonymous', 'admin', 'office', 'contractor', 'client', 'otherClient'] as const
type Caller = (typeof callers)[number]
type SignedInCaller = Exclude<Caller, 'anonymous'>
type Expected = Record<Caller, number>

/** The callers' accounts: `client` is linked to `fixtures.farmId`; `otherClient` is not. */
const accounts: Record<SignedInCaller, string> = {
  admin: demo.admin,
  office: demo.office,
  contractor: demo.contractor,
  client: demo.clientNorth,
  otherClient: demo.clientSouth,
}

interface Fixtures {
  server: TestServer
  /** A farm of the `client` caller (not of `otherClient`). */
  farmId: number
  /** The `client` caller's user id. */
  clientUserId: number
  /** A mailbox message with one attachment. */
  mailId: number
  /** The id of the first item an admin sees at `listPath` (a list or a Page). */
  firstId(listPath: string): Promise<number>
}

interface Call {
  params?: Record<string, string | number>
  /** query string without the '?' */
  query?: string
  body?: unknown
}

interface Row {
  call?: (f: Fixtures, caller: Caller) => Call | Promise<Call>
  /** The call ends the caller's session (sign-out): sign in again afterwards. */
  endsSession?: boolean
  expect: Expected
}

// ---- expectation shorthands ---------------------------------------------------------
const everyone = (status: number): Expected =>
  Object.fromEntries(callers.map((c) => [c, status])) as Expected
/** 401 for anonymous, `status` for every signed-in caller. */
const signedIn = (status: number): Expected => ({ ...everyone(status), anonymous: 401 })
/** 401 for anonymous, `status` for the given roles, 403 for the rest. */
const only = (allowed: SignedInCaller[], status: number): Expected =>
  Object.fromEntries(
    callers.map((c) => [c, c === 'anonymous' ? 401 : allowed.includes(c) ? status : 403]),
  ) as Expected
const admins = (status: number) => only(['admin'], status)

// ---- throwaway data -----------------------------------------------------------------
async function throwawayFarm(f: Fixtures): Promise<number> {
  return f.server.repos.farms.insert({ name: unique('Matrix farm '), timeZone: 'UTC', address: '', notes: '' })
}
async function invitedUser(f: Fixtures): Promise<number> {
  return f.server.repos.users.insert({ email: `${unique('matrix')}@example.test`, name: 'Matrix Invitee', role: 'office' })
}

/**
 * The five rows of a reference list that every signed-in role reads and admins manage.
 * Changes are checked without side effects: an empty POST is refused as invalid (400),
 * an empty PATCH changes nothing (200), a DELETE of an id that does not exist is 404.
 */
function adminManaged(base: string): Record<string, Row> {
  const first = (f: Fixtures) => f.firstId(base)
  return {
    [`GET ${base}`]: { expect: signedIn(200) },
    [`GET ${base}/:id`]: { call: async (f) => ({ params: { id: await first(f) } }), expect: signedIn(200) },
    [`POST ${base}`]: { call: () => ({ body: {} }), expect: admins(400) },
    [`PATCH ${base}/:id`]: { call: async (f) => ({ params: { id: await first(f) }, body: {} }), expect: admins(200) },
    [`DELETE ${base}/:id`]: { call: () => ({ params: { id: 999_999 } }), expect: admins(404) },
  }
}

// Fields, obstructions and orbit sets (tests/api/fields, obstructions, orbits, imports, outages).
async function rtkLevel(f: Fixtures): Promise<number> {
  const repos = f.server.repos.fields
  return (await repos.serviceLevelIdByName('RTK')) ?? repos.insertServiceLevel({ name: 'RTK', sigmaUereM: 0.012, note: '' })
}
const matrixSquare = {
  type: 'Polygon',
  coordinates: [[[-93.70, 42.00], [-93.69, 42.00], [-93.69, 42.01], [-93.70, 42.01], [-93.70, 42.00]]],
}
async function throwawayField(f: Fixtures): Promise<number> {
  return f.server.repos.fields.insert({
    farmId: f.farmId, name: unique('Matrix field '), crop: '', notes: '', serviceLevelId: await rtkLevel(f), antennaHeightM: 3,
    boundary: JSON.stringify(matrixSquare), areaHa: 91, centroidLat: 42.005, centroidLon: -93.695,
  })
}
const matrixTreeLine = { type: 'LineString', coordinates: [[-93.70, 42.0], [-93.69, 42.0]] }
async function throwawayObstruction(f: Fixtures): Promise<number> {
  return f.server.repos.obstructions.insert({
    farmId: f.farmId, kind: 'evergreen', heightM: 12, geometry: JSON.stringify(matrixTreeLine), leaflessFrom: null, leaflessTo: null, note: '',
  })
}
async function throwawayOrbitSet(f: Fixtures): Promise<number> {
  return f.server.repos.orbits.insertSet(
    { name: unique('Matrix set '), source: 'upload', format: 'tle', content: '', satelliteCount: 0, skippedCount: 0, reportJson: '[]', oldestEpoch: null, newestEpoch: null, uploadedBy: null },
    [],
  )
}
async function throwawayOutage(f: Fixtures): Promise<number> {
  return f.server.repos.outages.insert({ satId: 'GB2', fromAt: new Date('2030-02-01T00:00:00Z'), toAt: new Date('2030-02-02T00:00:00Z'), note: '', createdBy: null })
}
const farmEditors = (status: number) => only(['admin', 'office', 'contractor'], status)

// Passes, windows, hour detail, calendar feeds (tests/api/passes, windows, at-risk, calendar).
async function sprayingId(f: Fixtures): Promise<number> {
  const wt = await f.server.repos.workTypes.findByName('Spraying')
  if (!wt) throw new Error('the matrix needs the demo work type Spraying')
  return wt.id
}
/** A planned pass far in the future on a throwaway field of the client's farm, without a machine. */
async function throwawayPass(f: Fixtures): Promise<number> {
  return f.server.repos.passes.insert({
    fieldId: await throwawayField(f), workTypeId: await sprayingId(f), machineId: null,
    startAt: new Date(Date.UTC(2031, 5, 2, 14)), durationMin: 60, status: 'planned',
    atRisk: false, atRiskReason: null, suggestedStartAt: null, notes: '', createdBy: null,
  })
}
/** A calendar link of the client's farm, made by an admin; its plain token. */
async function calendarToken(f: Fixtures): Promise<string> {
  const token = randomBytes(32).toString('base64url')
  await f.server.repos.calendarTokens.insert({ farmId: f.farmId, tokenHash: createHash('sha256').update(token).digest('hex'), label: 'matrix', includeWindows: false, createdBy: null })
  return token
}
/** The id of a fresh link of the client's farm made by `caller` (the client's own for both clients). */
async function calendarTokenId(f: Fixtures, caller: Caller): Promise<number> {
  const maker = caller === 'admin' || caller === 'office' || caller === 'otherClient' ? caller : 'client'
  const user = await f.server.repos.users.findByEmail(accounts[maker === 'otherClient' ? 'client' : maker])
  return f.server.repos.calendarTokens.insert({ farmId: f.farmId, tokenHash: createHash('sha256').update(randomBytes(32)).digest('hex'), label: 'matrix', includeWindows: false, createdBy: user!.id })
}
const weekQuery = (f: Fixtures) => `farmId=${f.farmId}&from=2031-06-01T00:00:00Z&to=2031-06-08T00:00:00Z`
const orbitStaff = (status: number) => only(['admin', 'office'], status)

// ---- the table ----------------------------------------------------------------------
const matrix: Record<string, Row> = {
  'GET /api/health': { expect: everyone(200) },
  'GET /api/meta': { expect: everyone(200) },

  'POST /api/auth/sign-in': {
    call: () => ({ body: { email: 'matrix-nobody@example.test', password: 'not-a-real-password' } }),
    expect: everyone(401),
  },
  'POST /api/auth/sign-out': { endsSession: true, expect: signedIn(204) },
  'POST /api/auth/sign-out-everywhere': { endsSession: true, expect: signedIn(204) },
  'GET /api/auth/me': { expect: signedIn(200) },
  'PATCH /api/auth/me': { call: () => ({ body: {} }), expect: signedIn(200) },
  'POST /api/auth/change-password': {
    call: () => ({ body: { currentPassword: 'not-the-password', newPassword: 'never-set-password' } }),
    expect: signedIn(400),
  },
  'POST /api/auth/request-reset': {
    call: () => ({ body: { email: 'matrix-nobody@example.test' } }),
    expect: everyone(202),
  },
  'POST /api/auth/reset': {
    call: () => ({ body: { token: 'x'.repeat(43), password: 'never-set-password' } }),
    expect: everyone(400),
  },

  'GET /api/farms': { expect: signedIn(200) },
  'GET /api/farms/:id': {
    call: (f) => ({ params: { id: f.farmId } }),
    expect: { ...signedIn(200), otherClient: 404 },
  },
  'POST /api/farms': {
    call: () => ({ body: { name: unique('Matrix farm '), timeZone: 'America/Chicago' } }),
    expect: admins(201),
  },
  'PATCH /api/farms/:id': { call: (f) => ({ params: { id: f.farmId }, body: {} }), expect: admins(200) },
  'DELETE /api/farms/:id': { call: async (f) => ({ params: { id: await throwawayFarm(f) } }), expect: admins(204) },

  'GET /api/users': { expect: admins(200) },
  'GET /api/users/:id': { call: (f) => ({ params: { id: f.clientUserId } }), expect: admins(200) },
  'POST /api/users': {
    call: () => ({ body: { email: `${unique('matrix')}@example.test`, name: 'Matrix Invitee', role: 'contractor' } }),
    expect: admins(201),
  },
  'PATCH /api/users/:id': { call: (f) => ({ params: { id: f.clientUserId }, body: {} }), expect: admins(200) },
  'POST /api/users/:id/resend-invite': {
    call: async (f) => ({ params: { id: await invitedUser(f) } }),
    expect: admins(204),
  },

  'GET /api/audit': { expect: admins(200) },

  'GET /api/mailbox': { expect: only(['admin', 'office'], 200) },
  'GET /api/mailbox/:id': { call: (f) => ({ params: { id: f.mailId } }), expect: only(['admin', 'office'], 200) },
  'GET /api/mailbox/:id/attachments/:index': {
    call: (f) => ({ params: { id: f.mailId, index: 0 } }),
    expect: only(['admin', 'office'], 200),
  },

  'GET /api/farms/:id/fields': { call: (f) => ({ params: { id: f.farmId } }), expect: { ...signedIn(200), otherClient: 404 } },
  'POST /api/farms/:id/fields': {
    call: async (f) => ({ params: { id: f.farmId }, body: { name: unique('Matrix field '), serviceLevelId: await rtkLevel(f), boundary: matrixSquare } }),
    expect: farmEditors(201),
  },
  'GET /api/fields/:id': { call: async (f) => ({ params: { id: await throwawayField(f) } }), expect: { ...signedIn(200), otherClient: 404 } },
  'PATCH /api/fields/:id': { call: async (f) => ({ params: { id: await throwawayField(f) }, body: { notes: 'matrix' } }), expect: farmEditors(200) },
  'DELETE /api/fields/:id': { call: async (f) => ({ params: { id: await throwawayField(f) } }), expect: farmEditors(204) },
  'GET /api/farms/:id/obstructions': { call: (f) => ({ params: { id: f.farmId } }), expect: { ...signedIn(200), otherClient: 404 } },
  'POST /api/farms/:id/obstructions': {
    call: (f) => ({ params: { id: f.farmId }, body: { kind: 'structure', heightM: 8, geometry: matrixTreeLine } }),
    expect: farmEditors(201),
  },
  'PATCH /api/obstructions/:id': { call: async (f) => ({ params: { id: await throwawayObstruction(f) }, body: { heightM: 13 } }), expect: farmEditors(200) },
  'DELETE /api/obstructions/:id': { call: async (f) => ({ params: { id: await throwawayObstruction(f) } }), expect: farmEditors(204) },
  'GET /api/orbit-sets': { expect: orbitStaff(200) },
  'POST /api/orbit-sets': { call: () => ({ body: {} }), expect: orbitStaff(400) },
  'GET /api/orbit-sets/:id': { call: async (f) => ({ params: { id: await throwawayOrbitSet(f) } }), expect: orbitStaff(200) },
  'DELETE /api/orbit-sets/:id': { call: async (f) => ({ params: { id: await throwawayOrbitSet(f) } }), expect: orbitStaff(204) },
  'GET /api/orbits/active': { expect: orbitStaff(200) },
  'PUT /api/orbits/active': { call: () => ({ body: [{ system: 'GPS', orbitSetId: null, enabled: true }] }), expect: orbitStaff(200) },
  'GET /api/orbit-data': { expect: signedIn(200) },
  'GET /api/orbit-feed/nominal.json': { expect: everyone(200) },
  // The test configuration's feed address does not resolve: staff get the feed failure (502).
  'POST /api/orbit-feed/run': { expect: orbitStaff(502) },
  'GET /api/orbit-feed/status': { expect: orbitStaff(200) },
  'POST /api/farms/:id/fields/import/preview': {
    call: (f) => ({ params: { id: f.farmId }, body: {} }),
    expect: { ...farmEditors(400) },
  },
  'POST /api/farms/:id/fields/import': { call: (f) => ({ params: { id: f.farmId }, body: {} }), expect: farmEditors(400) },
  // Elevation models (tests/api/terrain.test.ts). No file: 400; the matrix farm has no model to remove: 404.
  'GET /api/farms/:id/terrain': { call: (f) => ({ params: { id: f.farmId } }), expect: { ...signedIn(200), otherClient: 404 } },
  'GET /api/farms/:id/terrain/horizon': {
    call: (f) => ({ params: { id: f.farmId }, query: 'latDeg=38.35&lonDeg=-97.61&antennaHeightM=3' }),
    expect: { ...signedIn(200), otherClient: 404 },
  },
  'POST /api/farms/:id/terrain': { call: (f) => ({ params: { id: f.farmId }, body: {} }), expect: farmEditors(400) },
  'DELETE /api/farms/:id/terrain': { call: (f) => ({ params: { id: f.farmId } }), expect: farmEditors(404) },
  'GET /api/outages': { expect: orbitStaff(200) },
  'POST /api/outages': {
    call: () => ({ body: { satId: 'GA1', from: '2030-01-01T00:00:00Z', to: '2030-01-01T06:00:00Z', note: 'matrix' } }),
    expect: orbitStaff(201),
  },
  'PATCH /api/outages/:id': { call: async (f) => ({ params: { id: await throwawayOutage(f) }, body: { note: 'matrix' } }), expect: orbitStaff(200) },
  'DELETE /api/outages/:id': { call: async (f) => ({ params: { id: await throwawayOutage(f) } }), expect: orbitStaff(204) },
  'GET /api/passes': { expect: signedIn(200) },
  'GET /api/passes.csv': { call: (f) => ({ query: weekQuery(f) }), expect: { ...signedIn(200), otherClient: 404 } },
  'GET /api/passes/at-risk': { expect: signedIn(200) },
  'GET /api/passes/:id': { call: async (f) => ({ params: { id: await throwawayPass(f) } }), expect: { ...signedIn(200), otherClient: 404 } },
  'POST /api/passes': {
    call: async (f) => ({ body: { fieldId: await throwawayField(f), workTypeId: await sprayingId(f), start: '2031-06-03T14:00:00Z' } }),
    expect: farmEditors(201),
  },
  'PATCH /api/passes/:id': { call: async (f) => ({ params: { id: await throwawayPass(f) }, body: { notes: 'matrix' } }), expect: farmEditors(200) },
  'POST /api/passes/:id/cancel': { call: async (f) => ({ params: { id: await throwawayPass(f) } }), expect: farmEditors(200) },
  'POST /api/passes/:id/done': { call: async (f) => ({ params: { id: await throwawayPass(f) } }), expect: farmEditors(200) },
  'POST /api/passes/:id/status': { call: async (f) => ({ params: { id: await throwawayPass(f) }, body: { status: 'started' } }), expect: farmEditors(200) },
  'POST /api/passes/:id/notes': { call: async (f) => ({ params: { id: await throwawayPass(f) }, body: { text: 'matrix' } }), expect: farmEditors(200) },
  'GET /api/crew/week': { expect: farmEditors(200) },
  'GET /api/farms/:id/taskdata.zip': { call: (f) => ({ params: { id: f.farmId } }), expect: { ...signedIn(200), otherClient: 404 } },
  'GET /api/farms/:id/taskdata.xml': { call: (f) => ({ params: { id: f.farmId } }), expect: { ...signedIn(200), otherClient: 404 } },
  'GET /api/fields/:id/hour-detail': {
    call: async (f) => ({ params: { id: await throwawayField(f) }, query: `hour=${new Date(Math.floor(Date.now() / 3_600_000) * 3_600_000).toISOString()}` }),
    expect: { ...signedIn(200), otherClient: 404 },
  },
  'GET /api/calendar/:token.ics': {
    call: async (f) => ({ params: { token: await calendarToken(f) } }),
    expect: everyone(200),
  },
  'GET /api/farms/:id/calendar-tokens': { call: (f) => ({ params: { id: f.farmId } }), expect: { ...only(['admin', 'office', 'client', 'otherClient'], 200), otherClient: 404 } },
  'POST /api/farms/:id/calendar-tokens': {
    call: (f) => ({ params: { id: f.farmId }, body: { label: 'matrix' } }),
    expect: { ...only(['admin', 'office', 'client', 'otherClient'], 201), otherClient: 404 },
  },
  'DELETE /api/calendar-tokens/:id': {
    // a fresh link per caller: made by the caller (admin, office) or by the farm's own client
    call: async (f, caller) => ({ params: { id: await calendarTokenId(f, caller) } }),
    expect: { ...only(['admin', 'office', 'client', 'otherClient'], 204), otherClient: 404 },
  },
  // Weekly plans (tests/api/plans): admins and office staff; the opt-out link is public.
  'GET /api/plans/weeks': { call: (f) => ({ query: `farmId=${f.farmId}` }), expect: only(['admin', 'office'], 200) },
  'POST /api/plans/preview': {
    call: (f) => ({ body: { farmId: f.farmId, weekStart: '2031-06-02', units: 'metric' } }),
    expect: only(['admin', 'office'], 200),
  },
  // an empty body is refused before anything is sent
  'POST /api/plans/send': { call: () => ({ body: {} }), expect: only(['admin', 'office'], 400) },
  'GET /api/plans/sends': { call: (f) => ({ query: `farmId=${f.farmId}` }), expect: only(['admin', 'office'], 200) },
  'GET /api/plans/revisions/:id': { call: () => ({ params: { id: 999_999 } }), expect: only(['admin', 'office'], 404) },
  'POST /api/plans/revisions/:id/resend': {
    call: () => ({ params: { id: 999_999 }, body: { confirm: true } }),
    expect: only(['admin', 'office'], 404),
  },
  'GET /api/farms/:id/plan-schedule': { call: (f) => ({ params: { id: f.farmId } }), expect: only(['admin', 'office'], 200) },
  'PUT /api/farms/:id/plan-schedule': { call: (f) => ({ params: { id: f.farmId }, body: {} }), expect: only(['admin', 'office'], 400) },
  'GET /api/farms/:id/plan-opt-outs': { call: (f) => ({ params: { id: f.farmId } }), expect: only(['admin', 'office'], 200) },
  'DELETE /api/farms/:id/plan-opt-outs/:email': {
    call: (f) => ({ params: { id: f.farmId, email: 'nobody@example.test' } }),
    expect: only(['admin', 'office'], 404),
  },
  // without a valid signed token: 400 for everyone, signed in or not
  'GET /api/plans/opt-out': { call: () => ({ query: 'token=1.bm9ib2R5QGV4YW1wbGUudGVzdA.forged-signature' }), expect: everyone(400) },
  'POST /api/plans/opt-out': { call: () => ({ body: { token: '1.bm9ib2R5QGV4YW1wbGUudGVzdA.forged-signature' } }), expect: everyone(400) },
  'GET /api/fields/:id/windows': {
    call: async (f) => ({ params: { id: await throwawayField(f) }, query: `workTypeId=${await sprayingId(f)}&allowNight=1` }),
    expect: farmEditors(200),
  },
  ...adminManaged('/api/service-levels'),
  ...adminManaged('/api/work-types'),
  ...adminManaged('/api/machines'),
  // Stored forecasts and jobs (tests/api/forecasts, jobs).
  'GET /api/fields/:id/forecast': { call: async (f) => ({ params: { id: await throwawayField(f) } }), expect: { ...signedIn(200), otherClient: 404 } },
  'GET /api/farms/:id/forecast': { call: (f) => ({ params: { id: f.farmId } }), expect: { ...signedIn(200), otherClient: 404 } },
  'POST /api/fields/:id/recompute': { call: async (f) => ({ params: { id: await throwawayField(f) } }), expect: only(['admin', 'office', 'contractor'], 202) },
  'GET /api/jobs': { expect: only(['admin', 'office'], 200) },
  'GET /api/jobs/summary': { expect: signedIn(200) },
  'GET /api/jobs/storage': { expect: only(['admin', 'office'], 200) },
  // RTK base stations, correction networks, a field's source, the Kp feed (tests/api/corrections).
  'GET /api/corrections': { expect: signedIn(200) },
  'POST /api/base-stations': { call: () => ({ body: {} }), expect: only(['admin', 'office'], 400) },
  'PATCH /api/base-stations/:id': { call: () => ({ params: { id: 999_999 }, body: {} }), expect: only(['admin', 'office'], 404) },
  'DELETE /api/base-stations/:id': { call: () => ({ params: { id: 999_999 } }), expect: only(['admin', 'office'], 404) },
  'POST /api/correction-networks': { call: () => ({ body: {} }), expect: only(['admin', 'office'], 400) },
  'PATCH /api/correction-networks/:id': { call: () => ({ params: { id: 999_999 }, body: {} }), expect: only(['admin', 'office'], 404) },
  'DELETE /api/correction-networks/:id': { call: () => ({ params: { id: 999_999 } }), expect: only(['admin', 'office'], 404) },
  'GET /api/fields/:id/correction': { call: async (f) => ({ params: { id: await throwawayField(f) } }), expect: { ...signedIn(200), otherClient: 404 } },
  'PUT /api/fields/:id/correction': { call: async (f) => ({ params: { id: await throwawayField(f) }, body: { kind: 'auto' } }), expect: farmEditors(200) },
  'GET /api/space-weather/kp-forecast.json': { expect: everyone(200) },
  'GET /api/space-weather': { expect: signedIn(200) },
  // The test configuration's public address does not resolve: staff get the feed failure (502).
  'POST /api/space-weather/run': { expect: only(['admin', 'office'], 502) },
}

// ---- running it ---------------------------------------------------------------------
let fixtures: Fixtures
const sessions = new Map<SignedInCaller, Client>()

async function clientFor(caller: Caller): Promise<Client> {
  if (caller === 'anonymous') return new Client(fixtures.server.app)
  let client = sessions.get(caller)
  if (!client) {
    client = await signIn(fixtures.server.app, accounts[caller])
    sessions.set(caller, client)
  }
  return client
}

function fillPath(path: string, params: Record<string, string | number> = {}): string {
  return path.replace(/:(\w+)/g, (_, name: string) => {
    if (!(name in params)) throw new Error(`the matrix row for ${path} gives no value for :${name}`)
    return encodeURIComponent(String(params[name]))
  })
}

beforeAll(async () => {
  const server = await startTestServer()
  const north = await server.repos.users.findByEmail(demo.clientNorth)
  const south = await server.repos.users.findByEmail(demo.clientSouth)
  const northFarms = await server.repos.users.farmIdsOf(north!.id)
  const southFarms = await server.repos.users.farmIdsOf(south!.id)
  const farmId = northFarms.find((id) => !southFarms.includes(id))
  if (!farmId) throw new Error('the demo scenario needs a farm of client.north that client.south does not share')
  const to = `${unique('matrix-mail')}@example.test`
  const since = new Date()
  await server.mailer.send({
    to,
    subject: 'Matrix message',
    text: 'For the authorization matrix.',
    html: '<p>For the authorization matrix.</p>',
    attachments: [{ filename: 'plan.ics', content: 'BEGIN:VCALENDAR\r\nEND:VCALENDAR\r\n', contentType: 'text/calendar' }],
  })
  const mail = await waitForMail(server.repos, to, since)
  const firstIds = new Map<string, number>()
  const firstId = async (listPath: string) => {
    if (!firstIds.has(listPath)) {
      const res = await (await clientFor('admin')).get(listPath)
      const items = (Array.isArray(res.body) ? res.body : res.body?.items) as { id: number }[] | undefined
      if (res.status !== 200 || !items?.length) throw new Error(`the matrix needs at least one item at ${listPath}`)
      firstIds.set(listPath, items[0].id)
    }
    return firstIds.get(listPath)!
  }
  fixtures = { server, farmId, clientUserId: north!.id, mailId: mail.id, firstId }
})

afterAll(async () => {
  // The throwaway fields would otherwise wait in every later server's forecast queue.
  if (fixtures) {
    const repos = fixtures.server.repos.fields
    for (const field of await repos.listAll()) if (field.name.startsWith('Matrix field ')) await repos.delete(field.id)
  }
  await fixtures?.server.close()
})

describe('authorization matrix', () => {
  it('has exactly one row for every registered API route', () => {
    const registered = listRoutes(fixtures.server.app).filter((r) => r.split(' ')[1].startsWith('/api'))
    expect(registered.length).toBeGreaterThan(0)
    const missing = registered.filter((r) => !(r in matrix))
    const stale = Object.keys(matrix).filter((r) => !registered.includes(r))
    expect(missing.join('\n'), 'routes without a row in the authorization matrix').toBe('')
    expect(stale.join('\n'), 'matrix rows for routes that do not exist').toBe('')
  })

  for (const [route, row] of Object.entries(matrix)) {
    it(route, async () => {
      const [method, path] = route.split(' ') as [string, string]
      const actual = {} as Expected
      const details: string[] = []
      for (const caller of callers) {
        const { params, query, body } = (await row.call?.(fixtures, caller)) ?? {}
        const client = await clientFor(caller)
        const url = fillPath(path, params) + (query ? `?${query}` : '')
        const res = await client.call(method.toLowerCase() as 'get', url, body)
        actual[caller] = res.status
        if (res.status !== row.expect[caller]) details.push(`${caller}: ${res.status} ${JSON.stringify(res.body)}`)
        if (row.endsSession && caller !== 'anonymous') sessions.delete(caller)
      }
      expect(actual, details.join('\n')).toEqual(row.expect)
    })
  }
})
