import type { Actor } from './services/actor.ts';

declare global {
  namespace Express {
    interface Request {
      /** The signed-in person acting for their active firm; absent when signed out. */
      actor?: Actor;
    }
  }
}

declare module 'express-session' {
  interface SessionData {
    userId?: string;
    firmId?: string;
    csrfToken?: string;
    next?: string;
  }
}

export {};
