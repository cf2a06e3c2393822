import passport from 'passport';
import { Strategy as GoogleStrategy, type Profile } from 'passport-google-oauth20';
import type { Knex } from 'knex';
import type { Config } from '../config.ts';
import { userForGoogleProfile } from '../services/session.ts';

/**
 * "Sign in with Google" through passport-google-oauth20. In production it talks to Google; locally
 * the same strategy is pointed at the fake provider on loopback through the OAUTH_* settings.
 */
export function createPassport(config: Config, knex: Knex): passport.PassportStatic {
  const instance = new passport.Passport() as unknown as passport.PassportStatic;
  instance.use(
    'google',
    new GoogleStrategy(
      {
        clientID: config.GOOGLE_CLIENT_ID,
        clientSecret: config.GOOGLE_CLIENT_SECRET,
        callbackURL: `${config.PUBLIC_URL}/auth/google/callback`,
        ...(config.OAUTH_AUTHORIZATION_URL ? { authorizationURL: config.OAUTH_AUTHORIZATION_URL } : {}),
        ...(config.OAUTH_TOKEN_URL ? { tokenURL: config.OAUTH_TOKEN_URL } : {}),
        ...(config.OAUTH_USERINFO_URL ? { userProfileURL: config.OAUTH_USERINFO_URL } : {}),
        state: true,
      },
      (
        _accessToken: string,
        _refreshToken: string,
        profile: Profile,
        done: (err: unknown, user?: Express.User | false, info?: { message: string }) => void,
      ) => {
        const json = (profile._json ?? {}) as { email?: string; email_verified?: boolean | string };
        userForGoogleProfile(knex, {
          sub: profile.id,
          email: json.email ?? profile.emails?.[0]?.value,
          emailVerified: json.email_verified === true || json.email_verified === 'true',
          name: profile.displayName,
        }).then(
          (user) => (user ? done(null, { id: user.id }) : done(null, false, { message: 'unknown_account' })),
          done,
        );
      },
    ),
  );
  return instance;
}
