/**
 * What the foundation's middleware adds to Express requests, typed once for every route.
 * (A module with only global declarations; the tsconfig includes it for every server file.)
 */
import type { Role } from '../../shared/types/api';
import type { UnitsPreference } from '../../shared/units';

/** The club in view, set by `clubAccess()` for routes under `/api/v1/clubs/:clubId`. */
export interface ClubContext {
  id: number;
  role: Role;
  /** The signed-in member's athlete profile in this club, or null (coaches and admins usually have none). */
  athleteProfileId: number | null;
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    /** The signed-in user, as passport puts it on `req.user`. */
    interface User {
      id: number;
      email: string;
      displayName: string;
      /** Read with the session when it is at hand; `loadMe` reports `club` when it is not. */
      unitsPreference?: UnitsPreference;
    }
    interface Request {
      /** Correlates a request with its log lines; also sent as the `X-Request-Id` header. */
      requestId: string;
      club?: ClubContext;
    }
  }
}
