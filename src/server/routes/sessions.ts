import { Hono } from 'hono';
import { z } from 'zod';
import { ConfigId, Name } from '../../schema';
import { ApiError, methodNotAllowed } from '../errors';
import { limitBody, readJson, validate } from '../http';
import type { Services } from '../services';
import { type AuthEnv, clientAddress, requireAuth } from '../sessions';
import { MAX_PASSCODE_LENGTH } from '../users';

export const SignInBody = z.strictObject({
  user: ConfigId,
  passcode: z
    .string()
    .min(1, 'must not be empty')
    .max(MAX_PASSCODE_LENGTH, `must be at most ${MAX_PASSCODE_LENGTH} characters`),
  device: z.strictObject({ id: ConfigId, name: Name }),
});

/** The same answer for an unknown user, a wrong passcode and a disabled user, so none can be told apart. */
const WRONG_CREDENTIALS = 'The user or passcode is not right';

/**
 * `POST /sessions` signs a device in and returns a bearer token; `DELETE /sessions/current` ends the session of the
 * token it is called with. Failed sign-ins are counted per user id and per client address: past the limit the
 * answer is 429 with Retry-After, before any passcode is checked.
 */
export function sessionRoutes(services: Services): Hono<AuthEnv> {
  const routes = new Hono<AuthEnv>();
  routes.post('/sessions', limitBody(16 * 1024, 'a sign-in is a few hundred bytes'), async (c) => {
    const body = validate(SignInBody, await readJson(c), 'The sign-in');
    const address = clientAddress(c);
    const started = services.now();
    const wait = services.throttle.retryAfterMs(body.user, address, started.getTime());
    if (wait > 0) {
      services.log({
        time: started.toISOString(),
        level: 'warn',
        event: 'sign-in-throttled',
        user: body.user,
        address,
      });
      const seconds = Math.ceil(wait / 1000);
      throw new ApiError(
        429,
        'E_TOO_MANY_REQUESTS',
        `Too many failed sign-ins; try again in ${Math.ceil(seconds / 60)} minute(s)`,
        { headers: { 'Retry-After': String(seconds) } },
      );
    }
    const result = await services.passcodes.check(body.user, body.passcode);
    const now = services.now();
    if (!result.ok) {
      services.throttle.fail(body.user, address, now.getTime());
      services.log({
        time: now.toISOString(),
        level: 'warn',
        event: 'sign-in-failed',
        reason: result.reason,
        user: body.user,
        address,
      });
      throw new ApiError(401, 'E_UNAUTHORIZED', WRONG_CREDENTIALS);
    }
    services.throttle.succeed(body.user);
    const token = services.sessions.create(result.user.id, body.device, now);
    services.log({
      time: now.toISOString(),
      level: 'info',
      event: 'signed-in',
      user: result.user.id,
      device: body.device.id,
    });
    return c.json({ token, user: { id: result.user.id, name: result.user.name, roles: result.user.roles } }, 201);
  });
  routes.all('/sessions', methodNotAllowed('POST'));

  routes.delete('/sessions/current', requireAuth(services), (c) => {
    const principal = c.get('principal');
    services.sessions.end(principal.tokenSha256, services.now());
    return c.body(null, 204);
  });
  routes.all('/sessions/current', methodNotAllowed('DELETE'));
  return routes;
}
