import passport, { type PassportStatic } from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import { AppError } from '../common/app-error';
import type { UsersService } from '../users/users.service';

/**
 * A Passport instance of this app (not the global one, so several apps can live in one test process).
 * The user is read again on every request: a role change or a deactivation takes effect at once.
 */
export function createPassport(users: UsersService): PassportStatic {
  const instance = new passport.Passport() as PassportStatic;
  instance.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password' }, (email, password, done) => {
      users.verifyCredentials(email, password).then(
        (user) => done(null, user),
        (err: unknown) =>
          err instanceof AppError && err.status === 401
            ? done(null, false, { message: err.message })
            : done(err),
      );
    }),
  );
  instance.serializeUser((user, done) => done(null, user.id));
  instance.deserializeUser((id: number, done) => {
    users.findById(id).then(
      (user) => done(null, user && user.active ? user : false),
      (err) => done(err),
    );
  });
  return instance;
}
