import { GLOSSARY, GLOSSARY_TERMS } from './glossary';
import type { PdfLayout } from './pdfLayout';

/** The glossary: every measure the report and the page use, one plain line each (the same texts as the page). */
export function glossarySection(L: PdfLayout): void {
  L.section('Glossary');
  L.paragraph('The measures in this report in plain words (the page shows the same lines beside each measure).', {
    size: 8.5,
    color: [80, 80, 80],
  });
  for (const term of GLOSSARY_TERMS) L.bullet(`${GLOSSARY[term].label}: ${GLOSSARY[term].text}`, 8.5);
}
