"""The posterior of the swept parameters (and free end points) between grid points: emcee.

Sampled with emcee's ensemble sampler (Foreman-Mackey et al. 2013), vectorised over the
walkers, with differential-evolution moves (ter Braak 2006; 80 %) and snooker moves (ter Braak
& Vrugt 2008; 20 %), the mix emcee's documentation shows for correlated posteriors: on the
demo's posterior (tau_rad, tau_drag and the end points, strongly correlated) they halve the
autocorrelation time of the default stretch move (about 45 steps against 80), on the smooth model and priors of
:mod:`torrid.workflow.smooth_model`. The walkers start in a small ball around the
interpolated best estimate. The first ``burn_in`` fraction of the steps is discarded; the
summary gives medians, the central 68.27 % and 95.45 % credible intervals, the integrated
autocorrelation time of each parameter (emcee's estimator) and the mean acceptance fraction.
The chain counts as converged when it is longer than 50 autocorrelation times after burn-in
(emcee's documentation: common practice); otherwise a warning says so.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from torrid.io.observation import SamplerSettings
from torrid.workflow import fit_checks
from torrid.workflow.fit_model import single_thread
from torrid.workflow.progress import bar_options

#: Percentiles of the summary: 95.45 % low, 68.27 % low, median, 68.27 % high, 95.45 % high.
PERCENTILES = (2.275, 15.865, 50.0, 84.135, 97.725)


@dataclass(frozen=True, eq=False)
class Posterior:
    """A posterior sample and its summary.

    Attributes
    ----------
    names : list of str
        Parameter names: the swept dims, then ``night_temperature``, ``day_temperature``.
    samples : ndarray (nsample, nparameter)
        Samples after burn-in, in the parameters' own units (days, K).
    quantiles : ndarray (5, nparameter)
        At :data:`PERCENTILES`.
    autocorrelation_steps : ndarray (nparameter,)
        Integrated autocorrelation time of each parameter (steps).
    acceptance : float
        Mean acceptance fraction of the walkers.
    steps, walkers, burn_in_steps, accepted_steps : int
    """

    names: list
    samples: np.ndarray
    quantiles: np.ndarray
    autocorrelation_steps: np.ndarray
    acceptance: float
    steps: int
    walkers: int
    burn_in_steps: int
    accepted_steps: int

    def attrs(self) -> dict:
        """Fit-file attributes ``posterior_median_<name>``, ``posterior_low68_<name>``, ..."""
        out = {}
        for k, name in enumerate(self.names):
            q = self.quantiles[:, k]
            out.update({f"posterior_median_{name}": float(q[2]),
                        f"posterior_low68_{name}": float(q[1]),
                        f"posterior_high68_{name}": float(q[3]),
                        f"posterior_low95_{name}": float(q[0]),
                        f"posterior_high95_{name}": float(q[4]),
                        f"posterior_autocorrelation_steps_{name}":
                            float(self.autocorrelation_steps[k])})
        out.update(posterior_acceptance=float(self.acceptance), posterior_steps=self.steps,
                   posterior_walkers=self.walkers, posterior_burn_in_steps=self.burn_in_steps,
                   posterior_accepted_steps=self.accepted_steps,
                   posterior_sampler="emcee ensemble, differential-evolution (0.8) and "
                                     "snooker (0.2) moves")
        return out

    def summary(self) -> list[str]:
        """One line per parameter and one of convergence figures."""
        lines = []
        for k, name in enumerate(self.names):
            q = self.quantiles[:, k]
            lines.append(f"{name} = {q[2]:.4g} (68 %: {q[1]:.4g}-{q[3]:.4g}; 95 %: "
                         f"{q[0]:.4g}-{q[4]:.4g}); autocorrelation "
                         f"{self.autocorrelation_steps[k]:.3g} steps")
        lines.append(f"{self.walkers} walkers x {self.steps} steps ({self.burn_in_steps} "
                     f"burn-in), acceptance {self.acceptance:.2f}, {self.accepted_steps} "
                     "accepted steps")
        return lines


def sample(model, start: np.ndarray, steps: int, settings: SamplerSettings | None = None, *,
           progress: bool = True, source: str = "posterior") -> Posterior:
    """Run emcee on ``model`` (a SmoothModel) from around ``start`` for ``steps`` steps."""
    import emcee

    settings = settings or SamplerSettings()
    ndim = start.size
    walkers = max(settings.walkers, 2 * ndim + 2)
    walkers += walkers % 2
    rng = np.random.default_rng(settings.seed)
    span = model.upper - model.lower
    p0 = start + rng.normal(0.0, 1e-2, (walkers, ndim)) * span
    for _ in range(100):  # pull starting points into the prior's support
        bad = ~model.inside(p0)
        if not bad.any():
            break
        p0[bad] = start + rng.normal(0.0, 1e-3, (int(bad.sum()), ndim)) * span
    p0 = np.where(model.inside(p0)[:, None], p0, start)
    moves = [(emcee.moves.DEMove(), 0.8), (emcee.moves.DESnookerMove(), 0.2)]
    sampler = emcee.EnsembleSampler(walkers, ndim, model.log_probability, vectorize=True,
                                    moves=moves)
    sampler.random_state = np.random.RandomState(settings.seed).get_state()
    with single_thread():
        sampler.run_mcmc(p0, steps, progress=progress,
                         progress_kwargs={"desc": "posterior", "unit": "step", **bar_options()}
                         if progress
                         else None)
    burn = int(settings.burn_in * steps)
    chain = sampler.get_chain(discard=burn, flat=True)
    tau = np.asarray(sampler.get_autocorr_time(discard=burn, tol=0), float)
    acceptance = float(np.mean(sampler.acceptance_fraction))
    values = chain.copy()
    for k, axis in enumerate(model.axes):
        values[:, k] = axis.value(chain[:, k])
    quantiles = np.percentile(values, PERCENTILES, axis=0)
    kept = steps - burn
    fit_checks.check_convergence(kept, float(np.nanmax(tau)) if tau.size else np.nan, source)
    return Posterior(names=list(model.names), samples=values, quantiles=quantiles,
                     autocorrelation_steps=tau, acceptance=acceptance, steps=steps,
                     walkers=walkers, burn_in_steps=burn,
                     accepted_steps=int(round(acceptance * walkers * steps)))
