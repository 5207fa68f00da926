/// <reference types="astro/client" />

declare namespace App {
  interface Locals {
    /** The signed-in person, or null for anonymous requests. */
    user: import('./lib/server/auth/context').SessionUser | null;
    /** The active trust with the user's role in it, or null when none is active. */
    trust: import('./lib/server/auth/context').ActiveTrust | null;
  }
}
