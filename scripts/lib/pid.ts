/** Process ids kept in files, as the private MariaDB, the cluster and the local fakes keep theirs. */
import { existsSync, readFileSync } from 'node:fs';

/** The pid in `file`: a whole number above 0, else null. */
export function readPid(file: string): number | null {
	if (!existsSync(file)) return null;
	const pid = Number(readFileSync(file, 'utf8').trim());
	return Number.isInteger(pid) && pid > 0 ? pid : null;
}

/** Whether process `pid` runs; a zombie (ended, not yet reaped) does not. */
export function alive(pid: number | null): boolean {
	if (!pid) return false;
	try {
		process.kill(pid, 0);
		return !/^\d+ \(.*\) Z/.test(readFileSync(`/proc/${pid}/stat`, 'utf8'));
	} catch {
		return false;
	}
}
