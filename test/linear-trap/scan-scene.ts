// The linear-trap mass scan of the scan checks (test/linear-trap/scan.test.ts and, with space
// charge, test/spacecharge/linear-trap.test.ts): the LQ-2 rods and well, the RF ramped 150 → 330 V
// in 1 ms, 40 ions of m/z 200 near the centre. `stageExtra` goes inside the stage (an aux block),
// `sceneExtra` at the top level (a space_charge block).
export const linearTrapScanScene = (stageExtra = '', sceneExtra = '') => `
seed: 5
stages:
  - type: linear-trap
    r0: 4 mm
    length: 40 mm
    rf: { amplitude: 150 V, frequency: 1 MHz, ramp: { to: 330 V, over: 1 ms } }
    end_dc: 10 V
    kappa: 0.05
${stageExtra}
${sceneExtra}
ions:
  - { mz: 200, count: 40, position: { z: 20 mm, spread: 0.2 mm, spread_z: 0.5 mm }, energy: 0.01 eV, direction: isotropic }
run: { steps_per_cycle: 40, max_time: 1 ms, record_every: 0 }
`;
