/** What the sync badge and the "waiting to send" screen show; updated by the runner. */
import type { SyncProblem, SyncState } from './engine';

class SyncStatus {
	state = $state<SyncState>('idle');
	waiting = $state(0);
	/** Photos taken on this phone and not sent yet (`client/photos.ts`). */
	photosWaiting = $state(0);
	issues = $state(0);
	lastSyncAt = $state<string | null>(null);
	lastError = $state<SyncProblem | null>(null);
	online = $state(true);
	/** Whether the browser promised to keep our storage (null: not asked yet). */
	persisted = $state<boolean | null>(null);
	/** A new version of the app is ready (the update prompt). */
	updateReady = $state(false);
}

export const syncStatus = new SyncStatus();
