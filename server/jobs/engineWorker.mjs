// Worker thread bootstrap: the engine worker is TypeScript, so register tsx's loader in
// this thread first (worker threads do not inherit it), then load engineWorker.ts.
import { register } from 'tsx/esm/api'

register()
await import('./engineWorker.ts')
