"""engine_air: inlet–engine airflow match over a flight envelope.

Preliminary-design analysis. It is not a substitute for test data, the engine
manufacturer's installation requirements, or the applicable airworthiness rules
and licensed engineering judgement.

The package never imports Qt; the desktop program in ``app`` calls it on a
worker thread.
"""

__version__ = "0.1.0"

CAUTION = (
    "Preliminary-design analysis only. Results come from one-dimensional gas "
    "dynamics and idealised shock systems; they are not a substitute for test "
    "data, the engine manufacturer's installation requirements, or the "
    "applicable airworthiness rules and licensed engineering judgement."
)
