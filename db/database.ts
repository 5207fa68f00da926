import type { Insertable, Selectable, Updateable } from 'kysely';
import type { AssessmentsTables } from './tables/assessments';
import type { AuthTables } from './tables/auth';
import type { BillingTables } from './tables/billing';
import type { EstateTables, AuditEventsTable, BlocksTable, RoomsTable, SchoolsTable } from './tables/estate';
import type { MonitoringTables } from './tables/monitoring';
import type { PortfolioTables } from './tables/portfolio';
import type { ProgrammeTables } from './tables/programmes';
import type { RegisterTables } from './tables/register';

/** The whole schema as Kysely sees it, assembled from each feature's tables in db/tables/. */
export interface Database
  extends EstateTables,
    AuthTables,
    RegisterTables,
    AssessmentsTables,
    BillingTables,
    PortfolioTables,
    MonitoringTables,
    ProgrammeTables {}

export type SchoolRow = Selectable<SchoolsTable>;
export type NewSchool = Insertable<SchoolsTable>;
export type BlockRow = Selectable<BlocksTable>;
export type NewBlock = Insertable<BlocksTable>;
export type RoomRow = Selectable<RoomsTable>;
export type NewRoom = Insertable<RoomsTable>;
export type RoomUpdate = Updateable<RoomsTable>;
export type NewAuditEvent = Insertable<AuditEventsTable>;
