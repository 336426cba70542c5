import { tickLabels } from './tick-labels';

describe('tickLabels', () => {
  it('when 1/T ticks are 0.00005 apart then each label differs (two digits would repeat 3.2e-3)', () => {
    // 1/T from 35 °C to 15 °C: 1/308.15 K = 3.245e-3 K⁻¹ and 1/288.15 K = 3.470e-3 K⁻¹ (arithmetic)
    const ticks = [0.0032, 0.00325, 0.0033, 0.00335, 0.0034, 0.00345, 0.0035];
    const labels = tickLabels(ticks);
    expect(labels).toEqual(['3.20e-3', '3.25e-3', '3.30e-3', '3.35e-3', '3.40e-3', '3.45e-3', '3.50e-3']);
    expect(new Set(labels).size).toBe(ticks.length);
  });

  it('when two digits already tell the ticks apart then they are kept short', () => {
    expect(tickLabels([0.001, 0.002, 0.003])).toEqual(['1.0e-3', '2.0e-3', '3.0e-3']);
    expect(tickLabels([0, 0.5, 1, 1.5])).toEqual(['0', '0.5', '1', '1.5']);
    expect(tickLabels([20000, 40000])).toEqual(['2.0e+4', '4.0e+4']);
  });

  it('when ticks are close on a plain axis then digits grow until they differ', () => {
    const labels = tickLabels([6.5001, 6.5002, 6.5003]);
    expect(labels).toEqual(['6.5001', '6.5002', '6.5003']);
  });

  it('when ticks are not compact then no exponent is written', () => {
    expect(tickLabels([0.0032, 0.00325], false)).toEqual(['0.0032', '0.00325']);
  });

  it('when the axis has one tick then it gets a label', () => {
    expect(tickLabels([7])).toEqual(['7']);
  });
});
