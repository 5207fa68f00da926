/** Tables of the subscriptions and payment events feature (owned by that feature; add table interfaces here). */
export interface BillingTables {}
