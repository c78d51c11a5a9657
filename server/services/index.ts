import { createAuditService } from './audit.ts'
import { createAuthService } from './auth.ts'
import type { ServiceContext } from './context.ts'
import { createFarmsService } from './farms.ts'
import { createFieldsService } from './fields.ts'
import { createImportsService } from './imports.ts'
import { createObstructionsService } from './obstructions.ts'
import { createOrbitsService } from './orbits.ts'
import { createOutagesService } from './outages.ts'
import { createOrbitFeedService } from './orbitFeed.ts'
import { createMailboxService } from './mailbox.ts'
import { createForecastsService } from './forecasts.ts'
import { createAtRiskService } from './atRisk.ts'
import { createExportsService } from './exports.ts'
import { createPassesService } from './passes.ts'
import { createPlansService } from './plans.ts'
import { createWindowsService } from './windows.ts'
import { createHourDetailService } from './hourDetail.ts'
import { createCalendarService } from './calendar.ts'
import { createCrewService } from './crew.ts'
import { createTaskDataService } from './taskData.ts'
import { createJobsService } from './jobs.ts'
import { createMachinesService } from './machines.ts'
import { createServiceLevelsService } from './serviceLevels.ts'
import { createWorkTypesService } from './workTypes.ts'
import { createMetaService } from './meta.ts'
import { createUsersService } from './users.ts'
import { createTerrainService } from './terrain.ts'
import { createCorrectionsService } from './corrections.ts'
import { createSpaceWeatherService } from './spaceWeather.ts'

export function createServices(ctx: ServiceContext) {
  return {
    auth: createAuthService(ctx),
    farms: createFarmsService(ctx),
    users: createUsersService(ctx),
    mailbox: createMailboxService(ctx),
    meta: createMetaService(ctx),
    fields: createFieldsService(ctx),
    obstructions: createObstructionsService(ctx),
    orbits: createOrbitsService(ctx),
    imports: createImportsService(ctx),
    outages: createOutagesService(ctx),
    orbitFeed: createOrbitFeedService(ctx),
    serviceLevels: createServiceLevelsService(ctx),
    workTypes: createWorkTypesService(ctx),
    machines: createMachinesService(ctx),
    jobs: createJobsService(ctx),
    forecasts: createForecastsService(ctx),
    passes: createPassesService(ctx),
    plans: createPlansService(ctx),
    windows: createWindowsService(ctx),
    hourDetail: createHourDetailService(ctx),
    calendar: createCalendarService(ctx),
    atRisk: createAtRiskService(ctx),
    exports: createExportsService(ctx),
    crew: createCrewService(ctx),
    taskData: createTaskDataService(ctx),
    terrain: createTerrainService(ctx),
    audit: createAuditService(ctx),
    corrections: createCorrectionsService(ctx),
    spaceWeather: createSpaceWeatherService(ctx),
  }
}
export type Services = ReturnType<typeof createServices>
