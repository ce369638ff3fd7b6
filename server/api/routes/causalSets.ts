import { Router, type RequestHandler, type Response } from 'express';
import multer from 'multer';
import type { ApiError } from '@shared/api';
import { CausalSetFileError } from '../../causalSets/parse';
import { requireAuth, requireTeam } from '../context';
import { badRequest, HttpError } from '../errors';
import { authenticate, currentTeam, requirePermission } from '../middleware/auth';
import type { AuthService } from '../services/auth';
import type { CausalSetService } from '../services/causalSets';
import type { TeamService } from '../services/team';

function formatBytes(bytes: number): string {
  if (bytes >= 1024 * 1024 && bytes % (1024 * 1024) === 0) return `${bytes / (1024 * 1024)} MiB`;
  if (bytes >= 1024 && bytes % 1024 === 0) return `${bytes / 1024} KiB`;
  return `${bytes} bytes`;
}

/**
 * multer keeps the upload in memory (it is parsed at once and never touches the disk) and stops
 * reading at the size limit. Its errors become API errors here: the size limit is 413 and says the
 * limit, anything else about the form is 400.
 */
function uploadOneFile(maxFileBytes: number): RequestHandler {
  const upload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: maxFileBytes, files: 1, fields: 20, fieldSize: 64 * 1024, parts: 25 },
    defParamCharset: 'utf8',
  }).single('file');
  return (req, res, next) => {
    upload(req, res, (error: unknown) => {
      if (!error) return next();
      if (error instanceof multer.MulterError) {
        if (error.code === 'LIMIT_FILE_SIZE') {
          return next(
            new HttpError(413, 'file_too_large', `The file is larger than the upload limit of ${formatBytes(maxFileBytes)} (${maxFileBytes} bytes).`),
          );
        }
        if (error.code === 'LIMIT_UNEXPECTED_FILE' || error.code === 'LIMIT_FILE_COUNT') {
          return next(badRequest('unexpected_file', 'Send exactly one file, in the multipart field "file".'));
        }
        return next(badRequest('invalid_form', `The upload form could not be read: ${error.message.toLowerCase()}.`));
      }
      next(badRequest('invalid_form', 'The upload could not be read as multipart/form-data.'));
    });
  };
}

/** A file that is not a causal set (or one too large for the engine): 422, one issue per problem. */
function sendFileError(res: Response, error: CausalSetFileError): void {
  const status = 422;
  const body: ApiError = {
    error: {
      code: error.code,
      message: error.message,
      issues: error.problems.map((p) => ({ path: 'file', message: p.message })),
    },
  };
  res.status(status).json(body);
}

/** Imported causal sets of the current team. Read: every member; upload and delete: compute roles. */
export function causalSetRoutes(deps: { auth: AuthService; teams: TeamService; causalSets: CausalSetService }): Router {
  const { auth, teams, causalSets } = deps;
  const router = Router();
  router.use('/causal-sets', authenticate(auth), currentTeam(teams));

  router.get('/causal-sets', requirePermission('read'), async (req, res) => {
    res.json({ items: await causalSets.list(requireTeam(req).id), limits: causalSets.limits() });
  });

  router.post('/causal-sets', requirePermission('compute'), uploadOneFile(causalSets.limits().maxFileBytes), async (req, res) => {
    const file = req.file ? { originalName: req.file.originalname, bytes: req.file.buffer } : undefined;
    try {
      const created = await causalSets.importFile(requireTeam(req), requireAuth(req).user, (req.body ?? {}) as Record<string, unknown>, file);
      res.status(201).location(`/api/causal-sets/${created.id}`).json(created);
    } catch (error) {
      if (error instanceof CausalSetFileError) return sendFileError(res, error);
      throw error;
    }
  });

  router.get('/causal-sets/:id', requirePermission('read'), async (req, res) => {
    res.json(await causalSets.detail(requireTeam(req).id, req.params.id as string));
  });

  router.get('/causal-sets/:id/file', requirePermission('read'), async (req, res) => {
    const { fileName, bytes } = await causalSets.originalFile(requireTeam(req).id, req.params.id as string);
    res.attachment(fileName);
    res.type('text/csv').send(bytes);
  });

  router.delete('/causal-sets/:id', requirePermission('compute'), async (req, res) => {
    await causalSets.remove(requireTeam(req).id, req.params.id as string);
    res.status(204).end();
  });

  return router;
}
