/** The cautions shown wherever results are shown. */
export function Caution({ external = false }: { external?: boolean }) {
  return (
    <aside className="caution" aria-label="Cautions">
      Not a medical device.{' '}
      {external
        ? 'Performance on one external file is still one setting; '
        : 'Apparent and internally validated performance is not external validation; '}
      recalibrate before using the model elsewhere, and follow local governance and licensed clinical judgement.
    </aside>
  );
}
