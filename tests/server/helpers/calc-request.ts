/**
 * A valid POST /api/calc/preparation body: 1000 mg/L Pb from lead(II) nitrate in a 100 mL class A flask,
 * weighed on an analytical balance at 20 °C, 1013 hPa, 50 % RH (demo values, not a reference case).
 */
export function validCalcRequest() {
  return {
    target: { value: '1000', unit: 'mg/L' },
    volume: { value: '100', unit: 'mL' },
    material: {
      formula: 'Pb(NO3)2',
      analyteFormula: 'Pb',
      purity: { value: '0.9995', expandedUncertainty: '0.0004', k: '2' },
      density: { value: '4.53', unit: 'g/mL' },
    },
    balance: { weightDensity: { value: '8.0', unit: 'g/mL' }, readability: { value: '0.1', unit: 'mg' } },
    air: { temperatureC: '20.0', pressureHPa: '1013', relativeHumidityPct: '50' },
    weighing: { reading: { value: '159.9', unit: 'mg' } },
  };
}
