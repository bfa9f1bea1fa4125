/** Offers bytes or text to the user as a file download (main thread only). */
export function downloadFile(content: Uint8Array | string, fileName: string, mimeType: string): void {
  const part: BlobPart = typeof content === 'string' ? content : new Uint8Array(content);
  const url = URL.createObjectURL(new Blob([part], { type: mimeType }));
  const a = document.createElement('a');
  a.href = url;
  a.download = fileName;
  a.rel = 'noopener';
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

/** File names Fulcra suggests: "<stem>-<outcome>-<yyyy-mm-dd>.<ext>", with unsafe characters replaced. */
export function suggestedFileName(
  kind: 'model-summary' | 'model' | 'pmml' | 'predictions' | 'workspace',
  outcome: string,
  date = new Date(),
): string {
  const safe = outcome.replace(/[^\p{L}\p{N}_-]+/gu, '_').slice(0, 40) || 'model';
  const day = date.toISOString().slice(0, 10);
  const ext = {
    'model-summary': 'pdf',
    model: 'fulcra-model.json',
    pmml: 'pmml',
    predictions: 'csv',
    workspace: 'fulcra-workspace.json',
  }[kind];
  return `fulcra-${kind}-${safe}-${day}.${ext}`;
}
