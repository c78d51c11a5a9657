// Background jobs: the list (office and admin) and the summary for the header bar.
import type { JobKind, JobList, JobStatus, JobSummary, StorageReport } from '@shared/schemas/jobs'
import { http } from './http'

export interface JobListParams {
  status?: JobStatus
  kind?: JobKind
  fieldId?: number
  limit?: number
}

export const listJobs = (params: JobListParams = {}) => http.get<JobList>('/jobs', { ...params })

/** Quiet: the header polls it, and a missed poll is not worth a message. */
export const getJobSummary = () => http.get<JobSummary>('/jobs/summary', undefined, { quiet: [0, 401, 403, 500, 502, 503] })

/** Sizes of the stored tables (office and admin). */
export const getStorageReport = () => http.get<StorageReport>('/jobs/storage')
