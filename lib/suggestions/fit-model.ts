/** Fits one candidate model (logistic or forest) on model rows with 0/1 labels (1 = noise). */
import { RandomForestClassifier } from 'ml-random-forest';
import { fitLogistic } from './logistic-regression';
import { columnMoments, standardiseRows, type ModelSpec, type TrainedModel } from './model';

export function fitModel(spec: ModelSpec, X: number[][], y: number[]): TrainedModel {
  if (spec.kind === 'logistic') {
    const standardise = columnMoments(X);
    return { spec, standardise, logistic: fitLogistic(standardiseRows(X, standardise), y, 1 / spec.C) };
  }
  const forest = new RandomForestClassifier({
    nEstimators: spec.trees,
    maxFeatures: spec.maxFeatures,
    seed: spec.seed,
    replacement: false,
    useSampleBagging: true,
    noOOB: true,
    treeOptions: { maxDepth: spec.maxDepth, minNumSamples: 3 },
  } as never);
  forest.train(X, y);
  const importance = (forest as unknown as { featureImportance(): number[] }).featureImportance();
  return { spec, forest: JSON.parse(JSON.stringify(forest.toJSON())), importance };
}
