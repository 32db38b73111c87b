/**
 * A dilution's solvent against its parent's matrix (issue 16 §5): a nitric-acid stock diluted with methanol is not
 * the same matrix. Solvents are compared by name, as registered (lots of the same solvent are the same matrix).
 * The caution is general (common practice for trace-metal and organic standards): an analyte stable in one matrix
 * can precipitate, adsorb or be lost in another; density and expansion change; the standard no longer matches the
 * calibration's matrix; and some acids react with organic solvents. The SDS and the lab's procedure decide.
 */
export interface MatrixWarning {
  parentSolvent: string;
  solvent: string;
  message: string;
}

const norm = (s: string) => s.trim().replace(/\s+/g, ' ').toLowerCase();

export function solventMatrixWarning(parent: { identifier: string; solventName: string | null | undefined }, solventName: string | null | undefined): MatrixWarning | null {
  if (!parent.solventName || !solventName || norm(parent.solventName) === norm(solventName)) return null;
  return {
    parentSolvent: parent.solventName,
    solvent: solventName,
    message:
      `${parent.identifier} is in ${parent.solventName}, but this dilution is made up with ${solventName}. ` +
      'A different matrix can make the analyte precipitate, adsorb or be lost, changes density and expansion, and may not match the method’s calibration matrix. ' +
      'Check that the method allows it; some acids react with organic solvents: read the SDS of both and follow the lab’s procedure before mixing them.',
  };
}
