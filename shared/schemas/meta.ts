/** GET /api/health */
export interface HealthStatus {
  status: 'ok' | 'degraded'
  database: 'ok' | 'down'
}

/** GET /api/meta: public facts the client needs before sign-in. */
export interface AppMeta {
  /** True while mail goes to the local fake SMTP server (the Mailbox page is then available). */
  fakeMailbox: boolean
  version: string
  /** True when demo sign-ins exist and are allowed (never in production). */
  demo: boolean
  /** The contracting business that runs this installation. */
  businessName: string
}
