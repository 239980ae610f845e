/**
 * A server announces itself in DATA_DIR/server.pid while it serves that folder (scripts/start.ts), so
 * `restore` can refuse to swap the database under a running server. SQLite's own locks cannot tell:
 * an idle server holds the database open in WAL mode without any lock another process would see.
 */
import fs from "node:fs";
import path from "node:path";

export const SERVER_PID_FILE = "server.pid";

export type ServerMark = { pid: number; startedAt: string; port: number };

export function writeServerMark(dataDirectory: string, mark: ServerMark): void {
  fs.mkdirSync(dataDirectory, { recursive: true });
  fs.writeFileSync(path.join(dataDirectory, SERVER_PID_FILE), JSON.stringify(mark) + "\n");
}

/** Removes the mark only if it is ours (a second server may have started on the folder since). */
export function removeServerMark(dataDirectory: string, pid = process.pid): void {
  const mark = readServerMark(dataDirectory);
  if (mark?.pid === pid) fs.rmSync(path.join(dataDirectory, SERVER_PID_FILE), { force: true });
}

export function readServerMark(dataDirectory: string): ServerMark | null {
  try {
    const parsed = JSON.parse(fs.readFileSync(path.join(dataDirectory, SERVER_PID_FILE), "utf8")) as ServerMark;
    return Number.isInteger(parsed.pid) ? parsed : null;
  } catch {
    return null;
  }
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    // EPERM: the process exists but belongs to someone else.
    return (error as NodeJS.ErrnoException).code === "EPERM";
  }
}

/** The server serving this folder, if its mark names a live process (a mark left by kill -9 is ignored). */
export function runningServer(dataDirectory: string): ServerMark | null {
  const mark = readServerMark(dataDirectory);
  return mark && mark.pid !== process.pid && alive(mark.pid) ? mark : null;
}
