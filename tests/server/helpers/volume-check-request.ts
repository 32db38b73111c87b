/** A valid POST /api/calc/volume-check body: a 10 mL class A bulb pipette, five readings, measured air. */
export function validVolumeCheckRequest() {
  return {
    ware: { kind: 'bulb_pipette', nominal: { value: '10', unit: 'mL' }, class: 'A', material: 'borosilicate_3_3', mode: 'delivery' },
    readings: ['9.9721', '9.9735', '9.9718', '9.9742', '9.9729'].map((value) => ({ value, unit: 'g' })),
    waterTemperatureC: '20.0',
    air: { temperatureC: '20.5', pressureHPa: '1008', relativeHumidityPct: '45' },
    balance: { weightDensity: { value: '8.0', unit: 'g/mL' }, readability: { value: '0.1', unit: 'mg' } },
  };
}
