import { Router, type Response } from 'express';
import { bundleFileCountHeader } from '@shared/bundles';
import { requireTeam } from '../context';
import { authenticate, currentTeam, requirePermission } from '../middleware/auth';
import type { AuthService } from '../services/auth';
import type { BundleService, PreparedBundle } from '../services/bundles';
import type { TeamService } from '../services/team';

/**
 * Streams a checked bundle. Once the first byte is out a failure can no longer become a JSON error, so
 * the connection is cut instead: the client sees an incomplete download, never a complete-looking zip.
 */
async function streamBundle(res: Response, bundle: PreparedBundle): Promise<void> {
  res.status(200);
  res.set({
    'Content-Type': 'application/zip',
    'Content-Disposition': `attachment; filename="${bundle.filename}"`,
    [bundleFileCountHeader]: String(bundle.fileCount),
  });
  try {
    await bundle.write(res);
  } catch (error) {
    // a reader that went away is normal; anything else is a fault worth its stack
    if (res.destroyed && !res.writableFinished) console.warn(`bundle ${bundle.filename}: ${(error as Error).message}`);
    else console.error(`bundle ${bundle.filename} failed while streaming: ${(error as Error).stack ?? String(error)}`);
    res.destroy();
  }
}

/** Supplementary bundles of the current team's studies and runs; other teams' ids answer 404 like missing ones. */
export function bundleRoutes(deps: { auth: AuthService; teams: TeamService; bundles: BundleService }): Router {
  const { auth, teams, bundles } = deps;
  const router = Router();
  const inTeam = [authenticate(auth), currentTeam(teams)];

  router.get('/studies/:id/bundle', ...inTeam, requirePermission('read'), async (req, res) => {
    await streamBundle(res, await bundles.prepareStudyBundle(requireTeam(req), req.params.id as string));
  });

  router.post('/bundles', ...inTeam, requirePermission('read'), async (req, res) => {
    await streamBundle(res, await bundles.prepareRunBundle(requireTeam(req), req.body));
  });

  return router;
}
