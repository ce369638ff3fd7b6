import type { VacuumStage } from '@shared/vacuum';

/**
 * Bad input to the engine: the message says what is wrong and is meant for the user; `field`, when
 * known, is the request setting at fault as a path into VacuumRequest ('subregion.indices',
 * 'subregion.future', 'truncation.count', 'engine', …), which the API reports as the path.
 */
export class EngineInputError extends Error {
  override readonly name = 'EngineInputError';
  constructor(
    message: string,
    readonly field?: string,
  ) {
    super(message);
  }
}

/** Thrown between stages when `shouldCancel()` returns true. */
export class CancelledError extends Error {
  override readonly name = 'CancelledError';
  readonly stage: VacuumStage;
  constructor(stage: VacuumStage) {
    super(`computation cancelled before stage "${stage}"`);
    this.stage = stage;
  }
}
