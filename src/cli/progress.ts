import type { Progress } from "../common/progress.js";
import type { OutputSink } from "./outputSink.js";

function formatDuration(seconds: number): string {
  if (!Number.isFinite(seconds)) return "?";
  if (seconds < 60) return `${Math.round(seconds)}s`;
  const minutes = Math.floor(seconds / 60);
  if (minutes < 60) return `${minutes}m${String(Math.round(seconds % 60)).padStart(2, "0")}s`;
  return `${Math.floor(minutes / 60)}h${String(minutes % 60).padStart(2, "0")}m`;
}

export function stderrProgress(sink: OutputSink, now: () => number = () => Date.now()): Progress {
  let label = "";
  let unitName = "relabelings";
  let total = 0;
  let done = 0;
  let restoredCount = 0;
  let started = 0;
  let lastDraw = 0;
  let nextTenth = 1;
  const line = () => {
    const elapsed = (now() - started) / 1000;
    const rate = elapsed > 0 ? (done - restoredCount) / elapsed : 0;
    const left = rate > 0 ? (total - done) / rate : NaN;
    return { elapsed, rate, left };
  };
  return {
    start(newLabel, newTotal, newUnit = "relabelings") {
      label = newLabel;
      unitName = newUnit;
      total = newTotal;
      done = 0;
      restoredCount = 0;
      started = now();
      lastDraw = 0;
      nextTenth = 1;
    },
    advance(count, restored = false) {
      done += count;
      if (restored) restoredCount += count;
      const { rate, left } = line();
      if (sink.errIsTerminal) {
        const t = now();
        if (t - lastDraw < 100 && done < total) return;
        lastDraw = t;
        const width = 24;
        const filled = Math.round((done / total) * width);
        sink.err(
          `\r${label} [${"#".repeat(filled)}${".".repeat(width - filled)}] ${done}/${total}  ${rate.toFixed(0)}/s  ${formatDuration(left)} left `,
        );
      } else {
        if (done >= (nextTenth * total) / 10) {
          sink.err(`${label}: ${done}/${total} ${unitName}, ${rate.toFixed(0)}/s, ${formatDuration(left)} left\n`);
          nextTenth = Math.floor((done * 10) / total) + 1;
        }
      }
    },
    finish() {
      if (sink.errIsTerminal && total > 0) {
        const { elapsed } = line();
        sink.err(`\r${label}: ${done}/${total} ${unitName} in ${formatDuration(elapsed)}${" ".repeat(30)}\n`);
      }
    },
  };
}
