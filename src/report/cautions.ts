/**
 * The cautions that go with every result, worded for the setting the model is meant for: clinical (patients,
 * governance, licensed clinical judgement) or industrial / quality (products, a quality system, local procedures).
 * The page (src/ui/Caution.tsx) and the PDF read the same setting and the same words.
 */
export type CautionSetting = 'clinical' | 'quality';

export const CAUTION_SETTINGS: readonly { value: CautionSetting; label: string }[] = [
  { value: 'clinical', label: 'clinical (patients)' },
  { value: 'quality', label: 'industrial / quality (products, processes)' },
];

/** The setting of a saved or typed value: 'quality' only when it says so, otherwise clinical (the default). */
export function cautionSettingOf(v: unknown): CautionSetting {
  return v === 'quality' ? 'quality' : 'clinical';
}

const INTERNAL =
  'Internal validation (apparent and bootstrap optimism-corrected performance on the development data) ' +
  'is not external validation. ';

/** The cautions printed in the PDF, per setting. */
export const CAUTIONS_BY_SETTING: Readonly<Record<CautionSetting, readonly string[]>> = {
  clinical: [
    'Fulcra is a statistics workbench, not a medical device. This model has not been assessed by any regulator ' +
      'and must not be used on its own to make decisions about individual patients.',
    INTERNAL + 'Performance in another hospital, period or population is unknown until it is measured there.',
    'Before use in another setting, check calibration on local data and recalibrate (at least the intercept) ' +
      'if the outcome rate differs.',
    'Use follows local governance and approval processes, and does not replace licensed clinical judgement.',
  ],
  quality: [
    'Fulcra is a statistics workbench, not a validated measuring or control system. This model has not been ' +
      'validated under any quality system and must not be used on its own to accept, reject or release ' +
      'individual products or batches.',
    INTERNAL + 'Performance on another line, plant, period or material is unknown until it is measured there.',
    'Before use in another setting, check calibration on local data and recalibrate (at least the intercept) ' +
      'if the outcome rate differs.',
    'Use follows your quality system and local procedures (change control, validation of computerised systems), ' +
      'and does not replace the judgement of qualified quality staff.',
  ],
};

/** The one-paragraph caution shown beside results on the page; `external`: the results are from another file. */
export function pageCaution(setting: CautionSetting, external: boolean): string {
  const validation = external
    ? 'Performance on one external file is still one setting; '
    : "A model's internal validation is not external validation; ";
  return setting === 'quality'
    ? `Not a validated measuring or control system. ${validation}recalibrate before using the model elsewhere, ` +
        'and follow your quality system and local procedures.'
    : `Not a medical device. ${validation}recalibrate before using the model elsewhere, ` +
        'and follow local governance and licensed clinical judgement.';
}

/**
 * The cautions that go with every monitoring result (issue 15), on the page and in the PDF, per setting: a signal
 * is a prompt to look, case mix outside the development data makes expected counts unreliable, local governance.
 */
export const MONITORING_CAUTIONS: Readonly<Record<CautionSetting, readonly string[]>> = {
  clinical: [
    'A signal, a unit outside the funnel or a rising O − E curve is a prompt to look at the cases, not proof of ' +
      'worse care: chance, coding, case mix the model does not capture and changes in recording all move them.',
    'Expected counts come from the model: for patients unlike the development data (other case mix, procedures ' +
      'or period) they are unreliable, and so is every O/E, limit and signal built on them.',
    'Follow local governance for reviewing and reporting signals; do not name units or staff outside it.',
  ],
  quality: [
    'A signal, a unit outside the funnel or a rising O − E curve is a prompt to investigate, not proof of a ' +
      'process fault: chance, recording changes and conditions the model does not capture all move them.',
    'Expected counts come from the model: for products or conditions unlike the development data they are ' +
      'unreliable, and so is every O/E, limit and signal built on them.',
    'Follow your quality system and local procedures for investigating and reporting signals.',
  ],
};
