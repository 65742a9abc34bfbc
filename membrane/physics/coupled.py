r"""The head coupled to the air on its faces and in its body: complex frequencies (docs/physics.md, "Solving").

The full-physics model, in the modules of its parts:

* ritz.py -- the Ritz space of one order: in-vacuum modes plus a rim function;
* operator.py -- the operator :math:`Z(\omega) = K + S(\omega) - \omega^2 (M + A(\omega))`
  of an order: radiation on the open faces, the body's air as duct modes, other losses;
* contour.py and spectrum.py -- every root of an order in a window (contour integrals);
* tracking.py -- roots followed along a parameter (predictor, local solve, shape match);
* assembly.py -- a drum as its orders' problems, the roots weighed and labelled;
* membrane/solver.py -- the labelled roots as Mode rows (``full_modes``).

T60 = 3 ln 10 / Im omega. This module gathers their public names for callers that want the
model as one import.
"""

from __future__ import annotations

from ..solver import full_modes  # noqa: F401
from .assembly import (LN1000, OrderRoots, decay_time, drum_orders,  # noqa: F401
                       identical_heads, label_roots, model_notes, order_duct_gammas,
                       order_root_set, solve_drum)
from .operator import (DEFAULT, HeadOrder, Order, RootSet, Settings, Shape, block_diag,  # noqa: F401
                       shape_of, unit_duct, unit_space, unit_table)
from .ritz import RitzSpace, radial_nodes  # noqa: F401
