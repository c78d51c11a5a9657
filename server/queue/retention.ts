// How long finished job rows are kept (the nightly refresh removes older ones; forecast
// hours before the current window go in the same run). Common practice: two weeks of
// history covers a fortnight's questions about "what ran when" without growing the table.
export const FINISHED_JOB_RETENTION_DAYS = 14
