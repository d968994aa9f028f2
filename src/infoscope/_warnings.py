"""Warning classes of infoscope (the test suite turns these into errors)."""


class InfoscopeWarning(UserWarning):
    """Base class of every warning infoscope emits about the user's data or options."""


class SmallSampleWarning(InfoscopeWarning):
    """The sample is too small for the number of cells: estimates are unreliable."""


class DataQualityWarning(InfoscopeWarning):
    """A column needed a policy decision (inf values, mixed types, folded levels ...)."""
