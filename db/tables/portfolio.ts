import type { ColumnType } from 'kysely';
import type { Json } from './json';

type Timestamp = ColumnType<Date, Date | string | undefined, Date | string>;

/** Per trust: the saved ranking weights (null = engine defaults) and what the ranks were built from. */
export interface PortfolioSettingsTable {
  trust_id: string;
  weight_risk: number | null;
  weight_cost_effectiveness: number | null;
  weight_payback: number | null;
  weights_saved_at: Timestamp | null;
  weights_saved_by_email: string | null;
  ranked_weights: Json<unknown> | null;
  ranked_stamp: string | null;
  ranked_at: Timestamp | null;
}

/** Each current room's place in its trust under the trust's weights (1 = do first). */
export interface PortfolioRanksTable {
  trust_id: string;
  room_id: string;
  school_id: string;
  rank: number;
  score: number;
}

/** Tables of the saved ranking weights and other portfolio settings feature. */
export interface PortfolioTables {
  portfolio_settings: PortfolioSettingsTable;
  portfolio_ranks: PortfolioRanksTable;
}
