// The rule lives in shared/ so the run form applies the same one (GET /api/limits states it).
export * from '@shared/engineChoice';
