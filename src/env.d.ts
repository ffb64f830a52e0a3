/// <reference types="astro/client" />

declare namespace App {
  interface Locals {
    /** The signed-in person, read once per request by src/middleware.ts; null when signed out. */
    user: import('./lib/server/session-user').SessionUser | null;
    /** The user's organisation; null when signed out. */
    organisation: import('./lib/server/session-user').SessionOrganisation | null;
  }
}
