"""Find the sense electrodes, follow their traces, measure their surroundings."""
