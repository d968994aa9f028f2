"""infoscope.encode"""
