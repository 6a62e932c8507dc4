import { CAUTION } from '../../src/caution';

/** The clinical caution, always on screen. */
export function Caution() {
  return (
    <p className="caution" role="note" data-testid="caution">
      {CAUTION}
    </p>
  );
}
