/**
 * Passport strategies: e-mail + password (passport-local) and Google (passport-google-oauth20), the latter
 * pointed by configuration at Google or at the local OAuth 2.0 fake (server/fakes/oauth.ts).
 * The session keeps only the user id.
 */
import type { Request } from 'express';
import passport from 'passport';
import { Strategy as GoogleStrategy, type Profile } from 'passport-google-oauth20';
import { Strategy as LocalStrategy } from 'passport-local';
import { config } from '../config';
import { takeSessionUser } from '../http/session';
import { log } from '../logger';
import { checkPassword, findOrCreateGoogleUser, findSessionUser } from '../services/auth';

let configured = false;

/** Google's userinfo sends `email_verified` as a boolean; older profile formats sent the string "true". */
function isVerified(email: unknown): boolean {
  const verified = (email as { verified?: unknown } | undefined)?.verified;
  return verified === true || verified === 'true';
}

export function configurePassport(): typeof passport {
  if (configured) return passport;
  configured = true;

  passport.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password', session: false }, (email, password, done) => {
      checkPassword(email, password).then(
        (user) => done(null, user ?? false),
        (err: unknown) => done(err),
      );
    }),
  );

  if (config.google.enabled) {
    passport.use(
      new GoogleStrategy(
        {
          clientID: config.google.clientId,
          clientSecret: config.google.clientSecret,
          callbackURL: config.google.callbackUrl,
          authorizationURL: config.google.authUrl,
          tokenURL: config.google.tokenUrl,
          userProfileURL: config.google.userinfoUrl,
          scope: ['openid', 'profile', 'email'],
          state: true,
        },
        (_accessToken: string, _refreshToken: string, profile: Profile, done: (err: unknown, user?: Express.User | false) => void) => {
          const email = profile.emails?.[0];
          findOrCreateGoogleUser({
            sub: profile.id,
            email: email?.value ?? null,
            emailVerified: isVerified(email),
            displayName: profile.displayName,
          }).then(
            (user) => done(null, user),
            (err: unknown) => {
              // The callback route redirects to /signin?error=google; the reason stays in the log.
              log.warn('Google sign-in refused', { reason: err instanceof Error ? err.message : String(err) });
              done(null, false);
            },
          );
        },
      ),
    );
  }

  passport.serializeUser((user, done) => done(null, user.id));
  passport.deserializeUser((req: Request, id: unknown, done: (err: unknown, user?: Express.User | false) => void) => {
    if (typeof id !== 'number') {
      done(null, false);
      return;
    }
    // The session store read the user's row with the session (one round trip less); otherwise read it here.
    const known = takeSessionUser(req.sessionID, id);
    if (known !== undefined) {
      done(null, known ?? false);
      return;
    }
    findSessionUser(id).then(
      (user) => done(null, user ?? false),
      (err: unknown) => done(err),
    );
  });
  return passport;
}
