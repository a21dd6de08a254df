/** Words for the screens, one place (the option names themselves follow the spectrum CLI). */
export const methodLabels = {
  dmd: 'Exact DMD',
  edmd: 'EDMD',
  'kernel-edmd': 'Kernel EDMD',
} as const;

export const dictionaryLabels = { monomial: 'Monomials', hermite: 'Hermite polynomials', radial: 'Gaussian radial functions' } as const;
export const centreRuleLabels = { every: 'every s-th snapshot of X', indices: 'these snapshots of X' } as const;
export const kernelLabels = { linear: 'Linear', polynomial: 'Polynomial', gaussian: 'Gaussian' } as const;
export const partLabels = { eigenvalues: 'Eigenvalues', modes: 'Modes', eigenfunctions: 'Eigenfunction values', prediction: 'Prediction' } as const;
export const domainLabels = { discrete: 'Discrete time (λ)', continuous: 'Continuous time (ω = log λ / dt)' } as const;
