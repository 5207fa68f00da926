/** Tables of the sign-in, sessions, members and invitations (better-auth) plus membership limits feature (owned by that feature; add table interfaces here). */
export interface AuthTables {}
