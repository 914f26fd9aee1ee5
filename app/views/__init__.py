"""The program's views of a result: the envelope map, the selected point's detail, the findings, the inlet
side view and the sections; their colour scales and read-only helpers over a ``MapResult``."""
