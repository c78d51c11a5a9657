// The fault suite (npm run faults) at reduced counts: 3 SIGKILLs of the server during
// recomputes of every demo field, a MariaDB stop and start under a running server, and the
// SMTP server down during a plan send. It runs on a private MariaDB of its own (own data
// folder and port), so it never touches the test database of the other files.
import { describe, expect, it } from 'vitest'
import { printFigures, runFaults } from './run.ts'

describe('fault suite (reduced)', () => {
  it('nothing queued is lost, nothing is done twice, every mail goes out once', { timeout: 900_000 }, async () => {
    const lines: string[] = []
    const figures = await runFaults({ kills: 3, seed: 20261203, phases: ['kills', 'database', 'mail'], log: (s) => lines.push(s) })
    printFigures(figures, (s) => lines.push(s))
    expect(figures.broken, lines.join('\n')).toEqual([])
    const k = figures.kills!
    expect(k.kills).toBe(3)
    expect(k.killsWithJobsRunning).toBeGreaterThan(0)
    expect([k.jobsLost, k.jobsLeftRunning, k.duplicateHourRows, k.fieldsWrittenByTwoJobs]).toEqual([0, 0, 0, 0])
    expect(k.fieldsWithOneCurrentWeek).toBe(k.fields)
    const d = figures.database!
    expect(d.answered503).toBe(d.requestsDuringOutage)
    expect(d.message).toMatch(/database is not reachable/)
    expect(d.serverRestarted).toBe(false)
    expect(d.jobsLost).toBe(0)
    const m = figures.mail!
    expect(m.failedAttemptsWhileDown).toBeGreaterThan(0)
    expect([m.messagesReceived, m.recipientsWithOneMessage, m.duplicates]).toEqual([m.recipients, m.recipients, 0])
  })
})
