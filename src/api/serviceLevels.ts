// Service levels live in the planning module (admin reference data); this name stays for the
// pages that read only the levels and their sigma.
export { listServiceLevels } from './planning'
