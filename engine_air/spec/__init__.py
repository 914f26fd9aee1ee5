"""What a project is, as data: the frozen dataclasses of a project (``project``) and the description of one
file key (``field``). The leaf that the inlet types and the project file share: it imports nothing else of
``engine_air``, so ``inlets`` (which read the dataclasses and declare their keys as ``Field``s) and ``project``
(whose schema and loader read the inlet types' registry) need not import each other's way round.

``engine_air.project.model`` and ``engine_air.project.schema_field`` re-export these names.
"""
