// The kinds of problem a forest solves and the impurity measures its splits minimise. They live at the
// bottom of src/core because the tree grower, the forest, the model file and the importers all name them.

export type Task = 'classification' | 'regression';
export type Criterion = 'gini' | 'entropy' | 'squared-error';
