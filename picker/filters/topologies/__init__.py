"""One module per topology; importing this package registers them all in ``REGISTRY``."""

from picker.filters.topologies import (  # noqa: F401  (imported to register)
    inverting_highpass,
    inverting_lowpass,
    mfb_bandpass,
    mfb_highpass,
    mfb_lowpass,
    non_inverting_highpass,
    non_inverting_highpass_gain,
    non_inverting_lowpass,
    non_inverting_lowpass_gain,
    sallen_key_highpass,
    sallen_key_highpass_gain,
    sallen_key_lowpass,
    sallen_key_lowpass_gain,
)
