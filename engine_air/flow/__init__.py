"""The inlet-engine match as a chain of stages (method §1-§16), at any arrays of flight conditions.

``chain`` runs the stages in station order (``run_chain``, ``characteristic``, ``assemble``); ``stages`` (free
stream, demand, face, compression, capture), ``throat`` (throat and doors), ``drag`` and ``ledger`` hold them;
``points`` the result (``OperatingPoints``), ``flags`` the status bits. ``flow`` never imports ``envelope``:
the limits are judged there (``engine_air.envelope.conditions``).
"""
