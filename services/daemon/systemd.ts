// systemd readiness and watchdog: when NOTIFY_SOCKET is set (Type=notify), READY=1 once the daemon is up and
// WATCHDOG=1 at half the watchdog interval from the main loop. Node cannot send on a unix datagram socket, so
// this runs systemd-notify (the unit sets NotifyAccess=all for it). Outside systemd it does nothing.
import { execFile } from 'node:child_process';

export interface SystemdNotifier {
  ready(): void;
  stopping(): void;
  /** Starts the watchdog pings; `healthy` is asked before each ping (a stuck loop stops pinging). */
  startWatchdog(healthy: () => boolean): void;
  close(): void;
}

export function createSystemdNotifier(env: NodeJS.ProcessEnv = process.env): SystemdNotifier {
  const enabled = Boolean(env.NOTIFY_SOCKET);
  const usec = Number(env.WATCHDOG_USEC ?? 0);
  let timer: NodeJS.Timeout | undefined;
  const send = (...states: string[]) => {
    if (!enabled) return;
    execFile('systemd-notify', states, { timeout: 5000 }, () => undefined);
  };
  return {
    ready: () => send('--ready', `MAINPID=${process.pid}`),
    stopping: () => send('STOPPING=1'),
    startWatchdog(healthy) {
      if (!enabled || !(usec > 0)) return;
      timer = setInterval(() => {
        if (healthy()) send('WATCHDOG=1');
      }, usec / 2000);
      timer.unref();
    },
    close: () => {
      if (timer) clearInterval(timer);
    },
  };
}
