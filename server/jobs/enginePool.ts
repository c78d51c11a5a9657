// A small pool of worker threads running the precision engine (engineWorker.ts), one task
// per thread at a time. A thread that dies is replaced; its task fails with the reason.
import { Worker } from 'node:worker_threads'
import type { EngineMessage } from './engineWorker.ts'
import type { EngineTask } from '../forecast/inputs.ts'

type EngineResult = Extract<EngineMessage, { type: 'result' }>

interface Pending {
  task: EngineTask
  onProgress: (fraction: number) => void
  resolve: (result: EngineResult) => void
  reject: (error: Error) => void
}

interface Slot {
  worker: Worker
  taskId: number | null
  pending: Pending | null
}

// engineWorker.mjs registers tsx in the thread and loads engineWorker.ts.
const workerUrl = new URL('./engineWorker.mjs', import.meta.url)

export class EnginePool {
  private readonly slots: Slot[] = []
  private readonly waiting: Array<Pending & { taskId: number }> = []
  private nextTaskId = 1
  private closed = false

  constructor(private readonly size: number) {}

  /** Runs one field's engine task on a free thread; progress is reported 0..1. */
  run(task: EngineTask, onProgress: (fraction: number) => void = () => {}): Promise<EngineResult> {
    if (this.closed) return Promise.reject(new Error('The engine pool is closed.'))
    return new Promise((resolve, reject) => {
      this.waiting.push({ task, onProgress, resolve, reject, taskId: this.nextTaskId++ })
      this.dispatch()
    })
  }

  /** Threads currently computing. */
  get busy(): number {
    return this.slots.filter((s) => s.pending !== null).length
  }

  private spawn(): Slot {
    const worker = new Worker(workerUrl, { execArgv: [] })
    const slot: Slot = { worker, taskId: null, pending: null }
    worker.on('message', (message: EngineMessage) => {
      const pending = slot.pending
      if (!pending || message.taskId !== slot.taskId) return
      if (message.type === 'progress') {
        pending.onProgress(message.done / message.total)
        return
      }
      slot.pending = null
      slot.taskId = null
      if (message.type === 'result') pending.resolve(message)
      else pending.reject(new Error(message.message))
      this.dispatch()
    })
    const lost = (reason: string) => {
      const index = this.slots.indexOf(slot)
      if (index >= 0) this.slots.splice(index, 1)
      const pending = slot.pending
      slot.pending = null
      if (pending) pending.reject(new Error(reason))
      if (!this.closed) this.dispatch()
    }
    worker.on('error', (error) => lost(`The engine thread failed: ${error.message}`))
    worker.on('exit', (code) => lost(`The engine thread stopped (exit code ${code}).`))
    this.slots.push(slot)
    return slot
  }

  private dispatch(): void {
    while (this.waiting.length > 0 && !this.closed) {
      let slot = this.slots.find((s) => s.pending === null)
      if (!slot) {
        if (this.slots.length >= this.size) return
        slot = this.spawn()
      }
      const next = this.waiting.shift()!
      slot.pending = next
      slot.taskId = next.taskId
      slot.worker.postMessage({ taskId: next.taskId, task: next.task })
    }
  }

  /** Stops every thread; tasks in flight or waiting fail. */
  async close(): Promise<void> {
    this.closed = true
    for (const w of this.waiting.splice(0)) w.reject(new Error('The engine pool was closed.'))
    await Promise.all(this.slots.map((s) => s.worker.terminate()))
  }
}
