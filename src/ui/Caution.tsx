import { useId } from 'react';
import { CAUTION_SETTINGS, cautionSettingOf, pageCaution, type CautionSetting } from '../report/cautions';
import { setReportText } from '../state/actions';
import { useApp, useEnv } from './context';

/** The cautions shown wherever results are shown, worded for the setting (clinical or quality) the user chose. */
export function Caution({ external = false }: { external?: boolean }) {
  const { store } = useEnv();
  const id = useId();
  const setting = useApp((s) => cautionSettingOf(s.reportText.cautions));
  return (
    <aside className="caution" aria-label="Cautions" data-setting={setting}>
      {pageCaution(setting, external)}{' '}
      <label htmlFor={id} className="caution-setting" style={{ flexDirection: 'row', alignItems: 'center', gap: 4 }}>
        Setting:{' '}
        <select
          id={id}
          value={setting}
          onChange={(e) => store.apply(setReportText, { cautions: e.target.value as CautionSetting })}
        >
          {CAUTION_SETTINGS.map((o) => (
            <option key={o.value} value={o.value}>
              {o.label}
            </option>
          ))}
        </select>
      </label>
    </aside>
  );
}
