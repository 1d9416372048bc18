/**
 * express-session stored in MariaDB through connect-session-sequelize (table `auth_sessions`, created by
 * migration 0005, never by the store's sync()).
 */
import connectSessionSequelize from 'connect-session-sequelize';
import session from 'express-session';
import type { RequestHandler } from 'express';
import type { Sequelize } from 'sequelize';
import { config } from '../config';
import { errorFields, log } from '../logger';

const SequelizeStore = connectSessionSequelize(session.Store);

export function sessionMiddleware(sequelize: Sequelize): RequestHandler {
  const store = new SequelizeStore({
    db: sequelize,
    modelKey: 'AuthSession',
    tableName: 'auth_sessions',
    checkExpirationInterval: 15 * 60 * 1000,
    expiration: config.session.maxAgeMs,
  });
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
