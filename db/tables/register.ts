/** Tables of the register imports and saved column mappings feature (owned by that feature; add table interfaces here). */
export interface RegisterTables {}
