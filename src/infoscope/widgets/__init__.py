"""infoscope.widgets"""
