"""Generic part families as data (never brands): timers, diodes, MOSFETs.

Each numeric value carries its origin tag, one of ``"datasheet-generic"``
(a typical value published in data sheets of the generic family),
``"common-practice"``, ``"from-memory"`` or ``"demo"`` (invented, for demos).
"""
