/**
 * Writes every robustness-suite curve with its start values and bounds as
 * JSON lines (stdout), for the reference computation (reference.py):
 *
 *   npx esbuild test/robustness/export.ts --bundle --platform=node --log-level=error | node > /tmp/curves.jsonl
 *   python3 test/robustness/reference.py /tmp/curves.jsonl > test/robustness/reference.json
 *
 * Each line: family, index, x, y, the parameters' start/lower/upper (null
 * for none) and the model value at the true parameters computed by our
 * compiled model (`yTruth`), which the script uses to check that its own
 * copy of the formula is the same function.
 */
import { compileModel } from '../../engine/compile';
import { FAMILIES, curvesOf } from './scenarios';
import { fitPlanFor } from './fit-curve';

for (const family of FAMILIES) {
  const curves = curvesOf(family);
  const plan0 = fitPlanFor(family, curves[0]);
  const model = compileModel(plan0.blocks[0].model, family.params, ['x']);
  for (const curve of curves) {
    const plan = family.id === 'gaussian' ? fitPlanFor(family, curve) : plan0;
    const n = curve.x.length;
    const yTruth = new Float64Array(n);
    model.value(Float64Array.from(curve.truth), [Float64Array.from(curve.x)], n, yTruth);
    const params = plan.parameters.map((q) => ({ name: q.name, start: q.initial ?? null, lower: q.lower ?? null, upper: q.upper ?? null }));
    process.stdout.write(JSON.stringify({ family: family.id, index: curve.index, x: curve.x, y: curve.y, truth: curve.truth, yTruth: Array.from(yTruth), params }) + '\n');
  }
}
