import { analyzeBatch } from '../../analysis';
import { describeControl } from '../../analysis/control-recovery';
import { makeBatch } from '../../analysis/__tests__/batch-fixtures';
import { batchCompleteMail, qcFailureMail } from '../mail-templates';

describe('controls in the result mails', () => {
  // A check standard read at 3.0e-4 mol/L whose nominal value is 3.6e-4 mol/L: recovery about 83 %,
  // outside the common-practice limits of 90–110 %.
  const base = makeBatch();
  const result = analyzeBatch(
    [...base.readings, { position: 'C91', wavelengthNm: 640, absorbance: 0.04 + 1250 * 3e-4 }],
    [...base.samples, { position: 'C91', sampleId: 'CHK-LOW', role: 'control', concentrationM: 3.6e-4 }],
    { concentrationUnit: 'mmol/L' },
  );
  const errors = result.qc.filter((f) => f.severity === 'error');

  it('when a control recovers out of limits, then the QC mail names it in a plain sentence', () => {
    const mail = qcFailureMail('Ada', { name: 'Run 9', url: 'http://localhost/batches/9' }, errors);
    expect(mail.text).toMatch(
      /CHK-LOW: recovery 8\d\.\d % is outside the acceptance limits 90–110 % \[recovery-out-of-limits\]/,
    );
  });

  it('when a batch is complete, then its mail has a line per control in the batch unit', () => {
    const mail = batchCompleteMail('Ada', {
      id: 9,
      name: 'Run 9',
      instrument: 'Cuvette bench',
      fileCount: 1,
      url: 'http://localhost/batches/9',
      best: null,
      verdict: null,
      errorFlags: errors.length,
      controls: result.controls.map((c) => describeControl(c, result.settings)),
    });
    expect(mail.text).toMatch(
      /Control CHK-LOW: 0\.\d+ mmol\/L against 0\.360 mmol\/L nominal, recovery 8\d\.\d % \(limits 90–110 %\) — out of limits/,
    );
  });
});
