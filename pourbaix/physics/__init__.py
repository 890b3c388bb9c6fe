"""Physical chemistry: Gibbs energies at temperature, water, solutions, electrodes, reactions."""
