import { http } from './http'

/** What the client needs to know about this installation. */
export interface Meta {
  /** True while mail goes to the local fake SMTP server (then the Mailbox page is shown). */
  fakeMailbox: boolean
  version: string
  /** True when the demo scenario and its sign-ins are loaded. */
  demo: boolean
  /** The contracting business that runs this installation (when the server tells). */
  businessName?: string
}

export const fetchMeta = () => http.get<Meta>('/meta', undefined, { allowAnonymous: true })
