import { notify } from '../state/actions';
import type { Controller } from '../state/controller';
import type { Store } from '../state/store';
import { FULCRA_VERSION } from '../report/version';
import { downloadFile } from './download';

/** "Save workspace as a file": the worker writes the file, the page downloads it; a failure becomes a notice. */
export async function saveWorkspaceFile(store: Store, ctl: Controller): Promise<void> {
  try {
    const file = await ctl.workspaceFile(FULCRA_VERSION);
    if (file) downloadFile(file.bytes, file.name, 'application/gzip');
  } catch (err) {
    store.apply(notify, {
      kind: 'error',
      text: `The workspace file could not be written (${(err as Error).message}).`,
    });
  }
}
