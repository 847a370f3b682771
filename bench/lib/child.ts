import type { ChildProcess } from 'node:child_process';

/** Asks a forked bench server to stop (IPC 'stop', else SIGTERM), and kills it after 5 s. */
export async function stopChild(child: ChildProcess | null): Promise<void> {
  if (!child || child.exitCode !== null || child.signalCode !== null) return;
  const exited = new Promise<void>((res) => child.once('exit', () => res()));
  if (child.connected) child.send('stop');
  else child.kill('SIGTERM');
  const timer = setTimeout(() => child.kill('SIGKILL'), 5000);
  await exited;
  clearTimeout(timer);
}
