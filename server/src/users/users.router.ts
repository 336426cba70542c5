import { Router } from 'express';
import { requireRole } from '../auth/roles';
import { idParam, validateBody } from '../common/validate';
import { createUserSchema, updateUserSchema } from '../contracts/users';
import type { UsersService } from './users.service';

/** People: admins only. */
export function usersRouter(users: UsersService, publicUrl: string): Router {
  const router = Router();
  router.use(requireRole('admin'));

  router.get('/', async (_req, res) => {
    res.json(await users.list());
  });

  router.post('/', validateBody(createUserSchema), async (req, res) => {
    const created = await users.create(req.body, { id: req.user!.id, email: req.user!.email });
    res.status(201).json({
      user: created.user,
      setPasswordUrl: created.setPasswordToken
        ? `${publicUrl}/set-password?token=${encodeURIComponent(created.setPasswordToken)}`
        : undefined,
    });
  });

  router.patch('/:id', validateBody(updateUserSchema), async (req, res) => {
    const actor = { id: req.user!.id, email: req.user!.email };
    res.json(await users.update(idParam(req.params['id'], 'Person'), req.body, actor));
  });

  return router;
}
