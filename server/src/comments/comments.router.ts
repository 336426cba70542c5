import { Router } from 'express';
import { requireRole } from '../auth/roles';
import { idParam, validateBody } from '../common/validate';
import { createCommentSchema } from '../contracts/comments';
import { BATCH_READER_ROLES } from '../batches/batches.router';
import type { Role } from '../users/user.entity';
import type { CommentsService } from './comments.service';

/** Who writes comments (and removes their own; lab managers also anyone's). Admins read them. */
export const COMMENT_WRITER_ROLES: readonly Role[] = ['lab_manager', 'scientist'];

/** Comments on a batch, mounted under /api/batches beside the batches router. */
export function commentsRouter(comments: CommentsService): Router {
  const router = Router();
  // Per route, not router.use: this router shares the /batches mount with the batches router.
  const READERS = requireRole(...BATCH_READER_ROLES);
  const WRITERS = requireRole(...COMMENT_WRITER_ROLES);
  router.get('/:id/comments', READERS, async (req, res) => {
    res.json(await comments.list(idParam(req.params['id'], 'Batch')));
  });
  router.post('/:id/comments', WRITERS, validateBody(createCommentSchema), async (req, res) => {
    res.status(201).json(await comments.add(idParam(req.params['id'], 'Batch'), req.body, req.user!));
  });
  router.delete('/:id/comments/:commentId', WRITERS, async (req, res) => {
    res.json(
      await comments.remove(
        idParam(req.params['id'], 'Batch'),
        idParam(req.params['commentId'], 'Comment'),
        req.user!,
      ),
    );
  });
  return router;
}
