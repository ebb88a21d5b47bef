import { useEffect, useMemo, useState } from 'react';
import { createPortal } from 'react-dom';
import { colors } from '@/components/theme/tokens';
import { LABELS_PER_SHEET, SHEET, type LabelData } from './label-data';
import { qrSvg, svgDataUri } from './qr';

export const canPrint = true;

const ROOT_ID = 'proofyard-print';

/**
 * The sheet as the printer gets it: plain HTML in millimetres, in its own element beside the app
 * root. On screen it is hidden; in print everything else is, so only the labels come out, with
 * no navigation and no scroll container cutting them off.
 */
const printCss = `
#${ROOT_ID} { display: none; }
@media print {
  @page { size: A4 portrait; margin: 0; }
  html, body { height: auto !important; overflow: visible !important; background: ${colors.surface} !important; }
  body > *:not(#${ROOT_ID}) { display: none !important; }
  #${ROOT_ID} { display: block; }
  #${ROOT_ID} .py-sheet {
    display: grid;
    grid-template-columns: repeat(${SHEET.columns}, ${SHEET.labelWidthMm}mm);
    grid-auto-rows: ${SHEET.labelHeightMm}mm;
    width: ${SHEET.columns * SHEET.labelWidthMm}mm;
    break-after: page;
  }
  #${ROOT_ID} .py-sheet:last-child { break-after: auto; }
  #${ROOT_ID} .py-label {
    box-sizing: border-box;
    display: flex;
    align-items: center;
    gap: 2mm;
    padding: 2.5mm 3mm;
    overflow: hidden;
    break-inside: avoid;
    color: ${colors.text};
    font-family: system-ui, -apple-system, "Segoe UI", Roboto, Arial, sans-serif;
  }
  #${ROOT_ID} .py-label img { width: 29mm; height: 29mm; flex: none; }
  #${ROOT_ID} .py-text { min-width: 0; display: flex; flex-direction: column; gap: 1mm; }
  #${ROOT_ID} .py-tag { font-size: 13pt; font-weight: 700; line-height: 1.1; overflow-wrap: anywhere; }
  #${ROOT_ID} .py-small { font-size: 7.5pt; line-height: 1.2; white-space: nowrap; overflow: hidden; text-overflow: ellipsis; }
}
`;

function chunks<T>(items: readonly T[], size: number): T[][] {
  const out: T[][] = [];
  for (let i = 0; i < items.length; i += size) out.push(items.slice(i, i + size));
  return out;
}

export function PrintSheet({ labels }: { labels: readonly LabelData[] }) {
  const [root, setRoot] = useState<HTMLElement | null>(null);

  useEffect(() => {
    const element = document.createElement('div');
    element.id = ROOT_ID;
    element.setAttribute('aria-hidden', 'true');
    const style = document.createElement('style');
    style.textContent = printCss;
    document.head.appendChild(style);
    document.body.appendChild(element);
    setRoot(element);
    return () => {
      element.remove();
      style.remove();
    };
  }, []);

  const images = useMemo(
    () => new Map(labels.map((label) => [label.id, svgDataUri(qrSvg(label.url, colors.text, colors.surface))])),
    [labels],
  );

  if (!root) return null;
  return createPortal(
    <>
      {chunks(labels, LABELS_PER_SHEET).map((sheet, index) => (
        <div className="py-sheet" key={index}>
          {sheet.map((label) => (
            <div className="py-label" key={label.id} data-testid={`print-label-${label.id}`}>
              <img src={images.get(label.id)} alt="" />
              <div className="py-text">
                <div className="py-tag">{label.tag}</div>
                <div className="py-small">
                  {label.programCode} · {label.programName}
                </div>
                <div className="py-small">{label.stage}</div>
              </div>
            </div>
          ))}
        </div>
      ))}
    </>,
    root,
  );
}

export function printLabels() {
  window.print();
}
