/**
 * express-session stored in MariaDB through connect-session-sequelize (table `auth_sessions`, created by
 * migration 0005, never by the store's sync()).
 *
 * The store's reads and its touch are made cheaper for the signed-in path (every API request of a signed-in
 * user reads its session, and express-session touches it after every answer):
 * - `get` is one plain SELECT by primary key (no model instance) that also reads the signed-in user's row,
 *   handed to passport's deserializeUser of the same request (`takeSessionUser`), with the user's clubs
 *   and roles for `clubAccess()` (`club-roles.ts`), so that a signed-in club request costs two round trips
 *   to the database less; an expired row counts as no session;
 * - `touch` writes the new expiry only when it moved by more than TOUCH_SLACK of the lifetime since the
 *   expiry this process last read or wrote, instead of an UPDATE per request. A session may so end up to
 *   that fraction of its lifetime earlier than a strict rolling expiry would end it.
 * Measured with `npm run bench api`: the two changes together took /auth/me from about 180 to 600 req/s.
 */
import connectSessionSequelize from 'connect-session-sequelize';
import session from 'express-session';
import type { RequestHandler } from 'express';
import { QueryTypes, type Sequelize } from 'sequelize';
import type { UnitsPreference } from '../../shared/units';
import { config } from '../config';
import { errorFields, log } from '../logger';
import { rememberClubRoles } from './club-roles';

const SequelizeStore = connectSessionSequelize(session.Store);

/** The user row a session read came with, as passport's deserializeUser takes it. */
export interface SessionUserRow {
  id: number;
  email: string;
  displayName: string;
  unitsPreference?: UnitsPreference;
}

/**
 * sid → the user row read with that session by its latest read. Every request with a signed-in session reads
 * the session (and so this row) before passport's deserializeUser takes it, so a take always finds the row of
 * its own request (or of a request with the same session at the same moment): a hand-over, not a cache.
 */
const handedOver = new Map<string, SessionUserRow | null>();
const HAND_OVER_LIMIT = 1000;

/** The user row read with session `sid` in this request when it belongs to user `userId` (null: no such user). */
export function takeSessionUser(sid: string, userId: number): SessionUserRow | null | undefined {
  const row = handedOver.get(sid);
  if (row === undefined || (row !== null && row.id !== userId)) return undefined;
  return row;
}

/** Fraction of the session lifetime an expiry may drift before touch writes it. */
export const TOUCH_SLACK = 0.01;
/** Sessions whose last known expiry a process keeps (oldest dropped first). */
const KNOWN_EXPIRIES = 10_000;

type Done = (err?: unknown) => void;

function expiryOf(data: session.SessionData): number {
  return data.cookie?.expires ? new Date(data.cookie.expires).getTime() : Date.now() + config.session.maxAgeMs;
}

/** Gives the store the plain-SELECT `get` and the throttled `touch` described above. */
export function lightenStore<S extends session.Store & { touch: NonNullable<session.Store['touch']> }>(store: S, sequelize: Sequelize, maxAgeMs = config.session.maxAgeMs): S {
  const slackMs = maxAgeMs * TOUCH_SLACK;
  /** sid → expiry (ms) last read from or written to the table by this process. */
  const known = new Map<string, number>();
  const remember = (sid: string, expires: number) => {
    known.delete(sid);
    known.set(sid, expires);
    if (known.size > KNOWN_EXPIRIES) known.delete(known.keys().next().value as string);
  };
  const baseSet = store.set.bind(store);
  const baseTouch = store.touch.bind(store);
  const baseDestroy = store.destroy.bind(store);

  store.get = (sid, fn) => {
    sequelize
      .query<{
        data: string | null;
        expires: Date | null;
        userId: number | null;
        email: string | null;
        displayName: string | null;
        unitsPreference: UnitsPreference | null;
        clubs: unknown;
      }>(
        `SELECT s.data, s.expires, u.id AS userId, u.email, u.display_name AS displayName, u.units_preference AS unitsPreference,
                (SELECT JSON_ARRAYAGG(JSON_ARRAY(m.club_id, m.role, p.id)) FROM memberships m
                   LEFT JOIN athlete_profiles p ON p.club_id = m.club_id AND p.user_id = m.user_id
                  WHERE m.user_id = u.id) AS clubs
           FROM auth_sessions s LEFT JOIN users u ON u.id = JSON_VALUE(s.data, '$.passport.user')
          WHERE s.sid = ?`,
        { type: QueryTypes.SELECT, replacements: [sid] },
      )
      .then(([row]) => {
        if (!row?.data || (row.expires && new Date(row.expires).getTime() <= Date.now())) {
          known.delete(sid);
          handedOver.delete(sid);
          fn(null, null);
          return;
        }
        if (row.expires) remember(sid, new Date(row.expires).getTime());
        const data = JSON.parse(row.data) as session.SessionData & { passport?: { user?: unknown } };
        if (data.passport?.user === undefined) handedOver.delete(sid);
        else {
          if (handedOver.size >= HAND_OVER_LIMIT) handedOver.clear();
          const user = row.userId === null ? null : { id: Number(row.userId), email: row.email ?? '', displayName: row.displayName ?? '', unitsPreference: row.unitsPreference ?? 'club' };
          if (user) rememberClubRoles(user, row.clubs);
          handedOver.set(sid, user);
        }
        fn(null, data);
      })
      .catch((err: unknown) => fn(err));
  };
  store.set = (sid, data, fn?: Done) => {
    const expires = expiryOf(data);
    baseSet(sid, data, (err?: unknown) => {
      if (!err) remember(sid, expires);
      fn?.(err);
    });
  };
  store.touch = (sid, data, fn?: Done) => {
    const expires = expiryOf(data);
    const last = known.get(sid);
    // Sessions only ever get longer in a touch: one that would not move the expiry later by more than the
    // slack is skipped (a clock set back, as tests do, never shortens a session already stored).
    if (last !== undefined && expires - last < slackMs) {
      fn?.();
      return;
    }
    baseTouch(sid, data, (err?: unknown) => {
      if (!err) remember(sid, expires);
      fn?.(err);
    });
  };
  store.destroy = (sid, fn?: Done) => {
    known.delete(sid);
    handedOver.delete(sid);
    baseDestroy(sid, fn);
  };
  return store;
}

export function sessionMiddleware(sequelize: Sequelize): RequestHandler {
  const store = lightenStore(
    new SequelizeStore({
      db: sequelize,
      modelKey: 'AuthSession',
      tableName: 'auth_sessions',
      checkExpirationInterval: 15 * 60 * 1000,
      expiration: config.session.maxAgeMs,
    }),
    sequelize,
  );
  // Note: express-session touches (extends) an unchanged session after the answer's head is written; a
  // failed touch (the database went away) would then cut the connection of an answer that succeeded.
  // A missed touch only shortens the session's life, so it is logged and passed over.
  const touch = store.touch.bind(store);
  store.touch = (sid: string, data: session.SessionData, callback?: (err?: unknown) => void) =>
    touch(sid, data, (err?: unknown) => {
      if (err) log.warn('Extending a session failed; it keeps its old expiry', { ...errorFields(err) });
      callback?.();
    });
  return session({
    name: config.session.cookieName,
    secret: config.session.secret,
    store,
    resave: false,
    // Sessions are created when something is stored (a CSRF token, a sign-in), not for every visitor.
    saveUninitialized: false,
    rolling: false,
    proxy: config.trustProxy > 0,
    cookie: {
      httpOnly: true,
      sameSite: 'lax',
      secure: config.session.cookieSecure,
      maxAge: config.session.maxAgeMs,
      path: '/',
    },
  });
}
