// Worker thread entry: runs the precision engine for one field at a time, off the main
// thread so the API stays responsive. Messages in: { taskId, task: EngineTask }.
// Messages out: { taskId, type: 'progress', done, total } after each chunk of hours,
// then { taskId, type: 'result', hours, satellitesUsed, samplePoints } or
// { taskId, type: 'error', message }.
import { setPriority } from 'node:os'
import { parentPort } from 'node:worker_threads'
import { forecastField, type HourAggregate } from '../../shared/precision/index.ts'
import type { EngineTask } from '../forecast/inputs.ts'

export interface EngineRequest {
  taskId: number
  task: EngineTask
}

export type EngineMessage =
  | { taskId: number; type: 'progress'; done: number; total: number }
  | { taskId: number; type: 'result'; hours: HourAggregate[]; satellitesUsed: number; samplePoints: number }
  | { taskId: number; type: 'error'; message: string }

const HOUR_MS = 3_600_000

/** Runs the task in chunks of `chunkHours` (same clock hours as one run: epochs start on the hour). */
export function runEngineTask(task: EngineTask, onChunk: (done: number, total: number) => void): Extract<EngineMessage, { type: 'result' }> {
  const { chunkHours, ...input } = task
  const hours: HourAggregate[] = []
  let satellitesUsed = 0
  let samplePoints = 0
  const chunks = Math.ceil(input.hours / chunkHours)
  for (let c = 0; c < chunks; c++) {
    const h = Math.min(chunkHours, input.hours - c * chunkHours)
    const result = forecastField({ ...input, startMs: input.startMs + c * chunkHours * HOUR_MS, hours: h })
    hours.push(...result.hours)
    satellitesUsed = result.satellitesUsed
    samplePoints = result.samplePoints.length
    onChunk(c + 1, chunks)
  }
  return { taskId: 0, type: 'result', hours, satellitesUsed, samplePoints }
}

if (parentPort) {
  // Linux keeps a nice value per thread: lowering this thread's priority leaves the main
  // thread (the API) ahead of the engine when the cores are busy.
  try {
    setPriority(0, 19)
  } catch {
    // Not permitted here: run at normal priority.
  }
  const port = parentPort
  port.on('message', (request: EngineRequest) => {
    try {
      const result = runEngineTask(request.task, (done, total) =>
        port.postMessage({ taskId: request.taskId, type: 'progress', done, total } satisfies EngineMessage),
      )
      port.postMessage({ ...result, taskId: request.taskId } satisfies EngineMessage)
    } catch (error) {
      port.postMessage({
        taskId: request.taskId,
        type: 'error',
        message: error instanceof Error ? error.message : String(error),
      } satisfies EngineMessage)
    }
  })
}
