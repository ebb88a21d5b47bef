import type { ReportFile } from '@/hooks/queries/validation';

/** The browser can open any file: a report (PDF or picture) or a CSV log. */
export const CAN_PICK_DOCUMENTS = true;

/**
 * Opens the browser's file chooser for one file. Resolves null when the chooser is closed
 * without a choice (browsers that send no `cancel` event leave the promise pending, which is harmless).
 */
export function pickFile(accept: string): Promise<ReportFile | null> {
  return new Promise((resolve) => {
    const input = document.createElement('input');
    input.type = 'file';
    input.accept = accept;
    input.style.display = 'none';
    const done = (file: File | null) => {
      input.remove();
      resolve(file ? { name: file.name, type: file.type, size: file.size, uri: '', blob: file } : null);
    };
    input.addEventListener('change', () => done(input.files?.[0] ?? null));
    input.addEventListener('cancel', () => done(null));
    document.body.appendChild(input);
    input.click();
  });
}

/** The text of a picked file (a CSV log). */
export function readFileText(file: ReportFile): Promise<string> {
  if (!file.blob) return Promise.reject(new Error('No file to read.'));
  return file.blob.text();
}
