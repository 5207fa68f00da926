/** Tables of the saved ranking weights and other portfolio settings feature (owned by that feature; add table interfaces here). */
export interface PortfolioTables {}
