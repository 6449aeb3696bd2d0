// Stage progress on stderr for long commands: one line per stage change, so logs stay readable
// when output is not a terminal.
import type { ProgressSink } from '../engine/util/progress';
import type { CliIo } from './io';

export function stageProgress(io: CliIo): ProgressSink {
  let lastStage = '';
  return {
    report(stage: string) {
      if (stage !== lastStage) {
        lastStage = stage;
        io.stderr(`… ${stage}\n`);
      }
    },
  };
}
