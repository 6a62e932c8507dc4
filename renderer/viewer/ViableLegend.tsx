interface Props {
  show: boolean;
  onShow(show: boolean): void;
}

/** The viable-tumour overlay's toggle and legend entry, shown when the visit has a viable-tumour mask. */
export function ViableLegend({ show, onShow }: Props) {
  return (
    <section className="side-section" aria-labelledby="viable-title" data-testid="viable-legend">
      <h3 id="viable-title">Viable tumour</h3>
      <label className="wash-toggle">
        <input type="checkbox" checked={show} onChange={(e) => onShow(e.target.checked)} data-testid="viable-toggle" />
        <span className="swatch viable-swatch" aria-hidden="true" /> Show the viable-tumour mask <kbd>V</kbd>
      </label>
      <p className="side-note">
        Hatched, with a dashed outline: the visit&apos;s viable (arterially enhancing) tumour mask, from which mRECIST takes each
        lesion&apos;s viable diameter as the longest axial segment inside it, never across necrosis.
      </p>
    </section>
  );
}
